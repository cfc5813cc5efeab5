import { ChangeDetectionStrategy, Component, OnInit, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { ApiError } from '../../core/api-error';
import { AppConfigStore } from '../../core/app-config-store';
import { AuthStore } from '../../core/auth-store';
import { controlMessage, formProblem } from '../../ui/form-messages';
import { safeReturnUrl } from '../return-url';

@Component({
  selector: 'nw-sign-in',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './sign-in.html',
  styleUrl: '../auth-page.scss',
})
export class SignIn implements OnInit {
  /** Query parameters (bound by the router). */
  readonly returnUrl = input<string>();
  readonly email = input<string>();

  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  protected readonly appConfig = inject(AppConfigStore);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', [Validators.required]],
  });

  ngOnInit(): void {
    const email = this.email();
    if (email) this.form.controls.email.setValue(email);
    void this.appConfig.load();
  }

  protected useDemoAccount(): void {
    const demo = this.appConfig.config()?.demoSignIn;
    if (demo) this.form.setValue({ email: demo.email, password: demo.password });
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { email, password } = this.form.getRawValue();
    try {
      await this.auth.signIn(email.trim(), password);
      await this.router.navigateByUrl(safeReturnUrl(this.returnUrl()));
    } catch (error) {
      this.problem.set(error instanceof ApiError && error.status === 401
        ? 'E-mail or password is wrong. Check both and try again, or reset your password.'
        : formProblem(error, this.form));
    } finally {
      this.busy.set(false);
    }
  }
}
