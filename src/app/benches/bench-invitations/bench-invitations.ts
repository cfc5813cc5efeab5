import { DatePipe } from '@angular/common';
import { toSignal } from '@angular/core/rxjs-interop';
import {
  ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked, viewChild,
} from '@angular/core';
import { FormGroupDirective, NonNullableFormBuilder, ReactiveFormsModule, ValidatorFn, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { messageOf } from '../../core/api-error';
import { BenchSummary, Invitation, Role } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { controlMessage, formProblem } from '../../ui/form-messages';
import { ROLE_HINTS, RoleLabelPipe } from '../../ui/role-label';
import { BenchesApi } from '../benches-api';
import { invitableRoles } from '../bench-members/member-permissions';

/** Invite people by e-mail with a role; list and revoke pending invitations (coaches and owners). */
@Component({
  selector: 'nw-bench-invitations',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule, DatePipe, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule,
    MatIconModule, MatTableModule, RoleLabelPipe,
  ],
  templateUrl: './bench-invitations.html',
  styles: `:host { display: block; padding-top: 16px; } .nw-email { flex: 1 1 280px; } .nw-role { flex: 0 1 180px; }
    .nw-invite-form { max-width: 720px; } .mat-column-actions { width: 1%; text-align: right; }`,
})
export class BenchInvitations {
  readonly bench = input.required<BenchSummary>();

  private readonly api = inject(BenchesApi);
  private readonly notice = inject(Notice);
  private readonly formDirective = viewChild(FormGroupDirective);
  protected readonly roles = computed(() => invitableRoles(this.bench()));
  protected readonly pending = signal<Invitation[]>([]);
  protected readonly problem = signal<string | null>(null);
  protected readonly listProblem = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly columns = ['email', 'role', 'invitedBy', 'expiresAt', 'actions'];
  protected readonly controlMessage = controlMessage;

  /** Set from the bench input (validators run before inputs are bound, so they read this instead). */
  private readonly allowed = signal<{ myRole: Role; roles: Role[] }>({ myRole: 'viewer', roles: [] });

  private readonly allowedRole: ValidatorFn = (control) => {
    const role = control.value as Role | '';
    if (!role) return null;
    const allowed = this.allowed();
    return allowed.roles.includes(role)
      ? null
      : { notAllowed: `You are ${allowed.myRole} here, so you cannot invite someone as ${role}. Choose one of: ${allowed.roles.join(', ')}.` };
  };

  protected readonly form = inject(NonNullableFormBuilder).group({
    email: ['', [Validators.required, Validators.email]],
    role: ['member' as Role | '', [Validators.required, this.allowedRole]],
  });

  private readonly roleValue = toSignal(this.form.controls.role.valueChanges, { initialValue: this.form.controls.role.value });
  protected readonly hint = computed(() => {
    const role = this.roleValue();
    return role ? ROLE_HINTS[role] : '';
  });

  constructor() {
    effect(() => {
      const bench = this.bench();
      const id = bench.id;
      untracked(() => {
        this.allowed.set({ myRole: bench.role, roles: invitableRoles(bench) });
        this.form.controls.role.updateValueAndValidity();
        void this.load(id);
      });
    });
  }

  protected async load(benchId = this.bench().id): Promise<void> {
    try {
      this.pending.set(await this.api.invitations(benchId));
      this.listProblem.set(null);
    } catch (error) {
      this.listProblem.set(`Could not load the pending invitations. ${messageOf(error)}`);
    }
  }

  protected async submit(): Promise<void> {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const email = this.form.getRawValue().email.trim();
    const role = this.form.getRawValue().role as Role;
    try {
      await this.api.invite(this.bench().id, email, role);
      this.notice.done(`Invitation sent to ${email}.`);
      // The next invitation is often for the same role: keep it, clear only the address.
      this.formDirective()?.resetForm({ email: '', role });
      await this.load();
    } catch (error) {
      this.problem.set(formProblem(error, this.form, 'No invitation was sent.'));
    } finally {
      this.busy.set(false);
    }
  }

  protected async revoke(invitation: Invitation): Promise<void> {
    let failure: string | null = null;
    try {
      await this.api.revokeInvitation(this.bench().id, invitation.id);
      this.notice.done(`Invitation for ${invitation.email} revoked; its link no longer works.`);
    } catch (error) {
      failure = `The invitation for ${invitation.email} was not revoked. ${messageOf(error)}`;
    }
    await this.load();
    if (failure) this.listProblem.set(failure);
  }
}
