import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, NonNullableFormBuilder, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router } from '@angular/router';
import { AuthStore } from '../../core/auth-store';
import { Notice } from '../../core/notice';
import { controlMessage, formProblem } from '../../ui/form-messages';
import { AccountApi } from '../account-api';

const normalise = (email: string) => email.trim().toLowerCase();

/**
 * The "Delete account" card at the bottom of `/account`: says what goes and what stays, asks for the password
 * and the account's e-mail typed again, and after the server's yes signs out here and goes to the sign-in page.
 */
@Component({
  selector: 'nw-delete-account',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  templateUrl: './delete-account.html',
  styles: `mat-form-field { width: 100%; } ul { margin: 4px 0 12px; padding-left: 20px; } h3 { font: var(--mat-sys-title-small); margin: 12px 0 0; }
    .nw-delete { background: var(--mat-sys-error); color: var(--mat-sys-on-error); }
    .nw-delete:disabled { background: color-mix(in srgb, var(--mat-sys-on-surface) 12%, transparent); color: color-mix(in srgb, var(--mat-sys-on-surface) 38%, transparent); }`,
})
export class DeleteAccount {
  protected readonly auth = inject(AuthStore);
  private readonly api = inject(AccountApi);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly email = computed(() => this.auth.user()?.email ?? '');

  protected readonly form = inject(NonNullableFormBuilder).group({
    password: ['', [Validators.required]],
    confirmEmail: ['', [Validators.required, (control: AbstractControl) => this.sameEmail(control)]],
  });
  private readonly status = toSignal(this.form.statusChanges, { initialValue: this.form.status });
  protected readonly canDelete = computed(() => this.status() === 'VALID' && !this.busy());

  protected message(control: AbstractControl, label: string): string {
    if (control.errors?.['otherEmail']) return `Type ${this.email()}, the address of this account.`;
    return controlMessage(control, label);
  }

  protected async delete(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const { password, confirmEmail } = this.form.getRawValue();
    try {
      await this.api.deleteAccount({ password, confirmEmail: normalise(confirmEmail) });
    } catch (error) {
      this.problem.set(formProblem(error, this.form, 'Your account was not deleted.'));
      this.busy.set(false);
      return;
    }
    // The server has forgotten every token of the account; forget the local one too.
    this.auth.clear();
    this.notice.done('Your account is deleted. Thank you for working with Noisewright.');
    await this.router.navigate(['/sign-in']);
  }

  private sameEmail(control: AbstractControl): ValidationErrors | null {
    const typed = String(control.value ?? '');
    if (!typed.trim()) return null;
    return normalise(typed) === normalise(this.email()) ? null : { otherEmail: true };
  }
}
