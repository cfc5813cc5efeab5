import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router, RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { ApiError } from '../../core/api-error';
import { Notice } from '../../core/notice';
import { MIN_PASSWORD_LENGTH, controlMessage, passwordsMatch, formProblem } from '../../ui/form-messages';

@Component({
  selector: 'nw-reset-password',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, RouterLink, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <section class="nw-auth">
      <h1>Choose a new password</h1>
      <p class="nw-page-lead">After this, sign in with the new password. Other sessions are signed out.</p>
      @if (problem(); as message) {
        <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
      }
      <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
        <mat-form-field appearance="outline">
          <mat-label>New password</mat-label>
          <input matInput formControlName="newPassword" type="password" autocomplete="new-password" />
          <mat-hint>At least {{ minPassword }} characters.</mat-hint>
          <mat-error>{{ controlMessage(form.controls.newPassword, 'a new password') }}</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>New password again</mat-label>
          <input matInput formControlName="confirm" type="password" autocomplete="new-password" />
          <mat-error>{{ controlMessage(form.controls.confirm, 'the new password again') }}</mat-error>
        </mat-form-field>
        <div class="nw-actions">
          <button mat-flat-button type="submit" [disabled]="busy()">Save the new password</button>
        </div>
      </form>
      <div class="nw-auth-links"><a routerLink="/forgot-password">Ask for a new link</a></div>
    </section>
  `,
  styleUrl: '../auth-page.scss',
})
export class ResetPassword {
  /** Route parameter: the single-use token from the e-mail link. */
  readonly token = input.required<string>();

  private readonly http = inject(HttpClient);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly minPassword = MIN_PASSWORD_LENGTH;
  protected readonly form = inject(NonNullableFormBuilder).group(
    {
      newPassword: ['', [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH)]],
      confirm: ['', [Validators.required]],
    },
    { validators: passwordsMatch('newPassword', 'confirm') },
  );

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    try {
      await firstValueFrom(this.http.post('/api/auth/reset/confirm', {
        token: this.token(), newPassword: this.form.getRawValue().newPassword,
      }));
      this.notice.done('Password changed. Sign in with the new password.');
      await this.router.navigate(['/sign-in']);
    } catch (error) {
      this.problem.set(error instanceof ApiError && (error.status === 410 || error.status === 404)
        ? 'This link has been used, replaced or has expired. Ask for a new link below.'
        : formProblem(error, this.form, 'The password did not change.'));
    } finally {
      this.busy.set(false);
    }
  }
}
