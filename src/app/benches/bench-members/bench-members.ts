import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router } from '@angular/router';
import { messageOf } from '../../core/api-error';
import { BenchSummary, Member, Role } from '../../core/api-types';
import { AuthStore } from '../../core/auth-store';
import { Notice } from '../../core/notice';
import { ConfirmDialog, ConfirmDialogData } from '../../ui/confirm-dialog/confirm-dialog';
import { RoleLabelPipe } from '../../ui/role-label';
import { BenchesApi } from '../benches-api';
import { CurrentBench } from '../current-bench';
import { canRemove, roleChoices } from './member-permissions';

@Component({
  selector: 'nw-bench-members',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DatePipe, MatTableModule, MatSelectModule, MatButtonModule, MatIconModule, MatTooltipModule, RoleLabelPipe],
  templateUrl: './bench-members.html',
  styles: `:host { display: block; padding-top: 16px; } .nw-role-select { width: 140px; }
    .mat-column-actions { width: 1%; white-space: nowrap; text-align: right; }`,
})
export class BenchMembers {
  readonly bench = input.required<BenchSummary>();

  private readonly api = inject(BenchesApi);
  private readonly auth = inject(AuthStore);
  private readonly store = inject(CurrentBench);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);
  private readonly router = inject(Router);
  protected readonly members = signal<Member[]>([]);
  /** What went wrong with the last action (role change, removal). */
  protected readonly problem = signal<string | null>(null);
  /** Why the list could not be loaded. */
  protected readonly listProblem = signal<string | null>(null);
  protected readonly loading = signal(true);
  protected readonly columns = ['displayName', 'email', 'role', 'joinedAt', 'actions'];
  protected readonly roleChoices = (m: Member): Role[] => roleChoices(this.bench().role, m);
  protected readonly canRemove = (m: Member): boolean => canRemove(this.bench().role, this.auth.user()?.id, m);
  protected readonly isMe = (m: Member): boolean => m.userId === this.auth.user()?.id;

  constructor() {
    effect(() => {
      const id = this.bench().id;
      untracked(() => void this.load(id));
    });
  }

  protected async load(benchId = this.bench().id): Promise<void> {
    this.loading.set(true);
    try {
      this.members.set(await this.api.members(benchId));
      this.listProblem.set(null);
    } catch (error) {
      this.listProblem.set(`Could not load the members. ${messageOf(error)}`);
    } finally {
      this.loading.set(false);
    }
  }

  protected async changeRole(member: Member, role: Role): Promise<void> {
    if (role === member.role) return;
    this.problem.set(null);
    try {
      await this.api.changeRole(this.bench().id, member.userId, role);
      this.notice.done(`${member.displayName} is now ${role}.`);
      if (this.isMe(member)) await this.store.open(this.bench().id);
    } catch (error) {
      this.problem.set(`The role of ${member.displayName} did not change. ${messageOf(error)}`);
    }
    await this.load();
  }

  protected confirmRemove(member: Member): void {
    const self = this.isMe(member);
    const data: ConfirmDialogData = self
      ? { title: `Leave “${this.bench().name}”?`, message: 'You lose access to this bench until someone invites you again.', confirmLabel: 'Leave bench', destructive: true }
      : { title: `Remove ${member.displayName}?`, message: `${member.email} loses access to this bench. Their runs stay on the bench.`, confirmLabel: 'Remove', destructive: true };
    this.dialog.open(ConfirmDialog, { data }).afterClosed().subscribe(async (confirmed) => {
      if (confirmed !== true) return;
      this.problem.set(null);
      try {
        await this.api.removeMember(this.bench().id, member.userId);
        if (self) {
          this.store.forget(this.bench().id);
          this.notice.done('You left the bench.');
          await this.router.navigate(['/benches']);
          return;
        }
        this.notice.done(`${member.displayName} was removed.`);
        await this.load();
      } catch (error) {
        this.problem.set(`${self ? 'You did not leave the bench' : `${member.displayName} was not removed`}. ${messageOf(error)}`);
      }
    });
  }
}
