import { ChangeDetectionStrategy, Component, OnInit, computed, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { ApiError } from '../../core/api-error';
import { AppConfigStore } from '../../core/app-config-store';
import { AuthStore } from '../../core/auth-store';
import { Notice } from '../../core/notice';
import {
  MIN_PASSWORD_LENGTH, controlMessage, notBlank, formProblem, passwordsMatch,
} from '../../ui/form-messages';
import { safeReturnUrl } from '../return-url';

@Component({
  selector: 'nw-sign-up',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './sign-up.html',
  styleUrl: '../auth-page.scss',
})
export class SignUp implements OnInit {
  readonly returnUrl = input<string>();
  readonly email = input<string>();

  private readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly appConfig = inject(AppConfigStore);
  /** Production servers only: there the first account becomes the admin with the setup code from the server log. */
  protected readonly askSetupCode = computed(() => this.appConfig.config()?.devMode === false);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly minPassword = MIN_PASSWORD_LENGTH;

  protected readonly form = inject(NonNullableFormBuilder).group(
    {
      displayName: ['', [Validators.required, Validators.maxLength(80), notBlank]],
      email: ['', [Validators.required, Validators.email]],
      password: ['', [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH)]],
      confirm: ['', [Validators.required]],
      setupCode: ['', [Validators.maxLength(64)]],
    },
    { validators: passwordsMatch('password', 'confirm') },
  );

  ngOnInit(): void {
    const email = this.email();
    if (email) this.form.controls.email.setValue(email);
    void this.appConfig.load();
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { displayName, email, password } = this.form.getRawValue();
    const setupCode = this.askSetupCode() ? this.form.controls.setupCode.value.trim() : '';
    try {
      const user = await this.auth.signUp(email.trim(), password, displayName.trim(), setupCode || undefined);
      if (setupCode && user.isAdmin) this.notice.done('The setup code was accepted: your account is the admin of this server.');
      if (setupCode && !user.isAdmin) {
        this.notice.problem(
          'Your account was created, but not as the admin: the setup code was not accepted (mistyped, used already, or an admin exists). ' +
            'Check the code in the server log, or ask the admin to make you one.',
        );
      }
      await this.router.navigateByUrl(safeReturnUrl(this.returnUrl()));
    } catch (error) {
      if (error instanceof ApiError && error.status === 409) {
        this.form.controls.email.setErrors({ server: 'An account with this e-mail exists. Sign in instead.' });
        this.form.controls.email.markAsTouched();
      }
      this.problem.set(formProblem(error, this.form, 'The account was not created.'));
    } finally {
      this.busy.set(false);
    }
  }
}
