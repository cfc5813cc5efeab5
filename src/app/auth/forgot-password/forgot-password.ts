import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { controlMessage, formProblem } from '../../ui/form-messages';

@Component({
  selector: 'nw-forgot-password',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <section class="nw-auth">
      <h1>Forgot your password?</h1>
      @if (sentTo(); as address) {
        <p role="status">If an account exists for <strong>{{ address }}</strong>, we have sent it a link to choose a
          new password. The link works once, for one hour. Check your mail (and its spam folder).</p>
        <div class="nw-auth-links"><a routerLink="/sign-in">Back to sign-in</a></div>
      } @else {
        <p class="nw-page-lead">Enter the e-mail address of your account and we will send you a link.</p>
        @if (problem(); as message) {
          <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
        }
        <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
          <mat-form-field appearance="outline">
            <mat-label>E-mail</mat-label>
            <input matInput formControlName="email" type="email" autocomplete="email" />
            <mat-error>{{ controlMessage(form.controls.email, 'your e-mail address') }}</mat-error>
          </mat-form-field>
          <div class="nw-actions">
            <button mat-flat-button type="submit" [disabled]="busy()">Send the link</button>
            <a mat-button routerLink="/sign-in">Cancel</a>
          </div>
        </form>
      }
    </section>
  `,
  styleUrl: '../auth-page.scss',
})
export class ForgotPassword {
  private readonly http = inject(HttpClient);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly sentTo = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
  });

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const email = this.form.getRawValue().email.trim();
    try {
      await firstValueFrom(this.http.post('/api/auth/reset/request', { email }));
      this.sentTo.set(email);
    } catch (error) {
      this.problem.set(formProblem(error, this.form));
    } finally {
      this.busy.set(false);
    }
  }
}
