import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router } from '@angular/router';
import { ApiError } from '../../core/api-error';
import { AuthStore } from '../../core/auth-store';
import { Notice } from '../../core/notice';
import { DeleteAccount } from '../delete-account/delete-account';
import { MIN_PASSWORD_LENGTH, controlMessage, passwordsMatch, formProblem } from '../../ui/form-messages';

/** `/account`: who I am, change my password, sign out, delete my account. */
@Component({
  selector: 'nw-account-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, DatePipe, DeleteAccount, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './account-page.html',
  styles: `.nw-facts { display: grid; grid-template-columns: max-content 1fr; gap: 6px 24px; margin: 0; }
    .nw-facts dt { color: var(--mat-sys-on-surface-variant); } .nw-facts dd { margin: 0; } mat-form-field { width: 100%; }`,
})
export class AccountPage {
  protected readonly auth = inject(AuthStore);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly controlMessage = controlMessage;
  protected readonly minPassword = MIN_PASSWORD_LENGTH;
  protected readonly form = inject(NonNullableFormBuilder).group(
    {
      currentPassword: ['', [Validators.required]],
      newPassword: ['', [Validators.required, Validators.minLength(MIN_PASSWORD_LENGTH)]],
      confirm: ['', [Validators.required]],
    },
    { validators: passwordsMatch('newPassword', 'confirm') },
  );

  protected async changePassword(formDirective: FormGroupDirective): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { currentPassword, newPassword } = this.form.getRawValue();
    try {
      await this.auth.changePassword(currentPassword, newPassword);
      formDirective.resetForm();
      this.notice.done('Password changed. Your other sessions are signed out.');
    } catch (error) {
      if (error instanceof ApiError && error.status === 401 && !error.fields['currentPassword']) {
        this.form.controls.currentPassword.setErrors({ server: 'This is not your current password. Type it again.' });
      }
      this.problem.set(formProblem(error, this.form, 'The password did not change.'));
    } finally {
      this.busy.set(false);
    }
  }

  protected async signOut(): Promise<void> {
    await this.auth.signOut();
    await this.router.navigate(['/sign-in']);
  }
}
