import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import type { RunnerDto, RunnersOverview } from '../../../../shared/api/runners';
import { messageOf } from '../../core/api-error';
import { ConfirmDialog, type ConfirmDialogData } from '../../ui/confirm-dialog/confirm-dialog';
import { RunnersApi } from '../runners-api';
import { NewRunnerDialog, type NewRunnerDialogData } from './new-runner-dialog';

/** How often the page asks for fresh heartbeats while it is open. */
export const REFRESH_MS = 5000;

/** "12 s ago", "4 min ago", "3 h ago", "2 d ago"; "never" without a heartbeat. */
export function agoText(iso: string | null, now: number): string {
  if (!iso) return 'never';
  const s = Math.max(0, Math.round((now - Date.parse(iso)) / 1000));
  if (s < 60) return `${s} s ago`;
  if (s < 3600) return `${Math.floor(s / 60)} min ago`;
  if (s < 86_400) return `${Math.floor(s / 3600)} h ago`;
  return `${Math.floor(s / 86_400)} d ago`;
}

/** `/admin/runners` (instance admin): runners with their heartbeat and jobs, queue depth, new and revoked tokens. */
@Component({
  selector: 'nw-runners-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, RouterLink, MatButtonModule, MatIconModule, MatTableModule],
  templateUrl: './runners-page.html',
  styleUrl: './runners-page.scss',
})
export class RunnersPage {
  private readonly api = inject(RunnersApi);
  private readonly dialog = inject(MatDialog);
  protected readonly overview = signal<RunnersOverview | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly now = signal(Date.now());
  protected readonly busy = signal<string | null>(null);
  protected readonly columns = ['name', 'state', 'heartbeat', 'threads', 'jobs', 'speed', 'done', 'actions'];
  protected readonly ago = agoText;
  protected readonly refreshSeconds = REFRESH_MS / 1000;

  constructor() {
    void this.load();
    const timer = setInterval(() => void this.load(), REFRESH_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }

  protected async load(): Promise<void> {
    try {
      const overview = await this.api.overview();
      this.overview.set(overview);
      this.now.set(Date.now());
      this.problem.set(null);
    } catch (error) {
      this.problem.set(`The runners could not be loaded. ${messageOf(error)}`);
    }
  }

  protected stateOf(r: RunnerDto): 'revoked' | 'online' | 'offline' {
    return r.revokedAt ? 'revoked' : r.online ? 'online' : 'offline';
  }

  protected async newToken(): Promise<void> {
    const data: NewRunnerDialogData = { backend: this.overview()?.backend ?? 'embedded' };
    const ref = this.dialog.open<NewRunnerDialog, NewRunnerDialogData, boolean>(NewRunnerDialog, { data, width: '640px', disableClose: true });
    await firstValueFrom(ref.afterClosed());
    await this.load();
  }

  protected async revoke(r: RunnerDto): Promise<void> {
    const data: ConfirmDialogData = {
      title: `Revoke the token of ${r.name}?`,
      message: `The runner is refused from its next call on; the runs it holds go back to the queue and continue elsewhere from their latest checkpoints. A revoked token cannot be restored: the machine needs a new one.`,
      confirmLabel: 'Revoke',
      destructive: true,
    };
    const confirmed = await firstValueFrom(this.dialog.open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, { data }).afterClosed());
    if (!confirmed) return;
    this.busy.set(r.id);
    try {
      await this.api.revoke(r.id);
      await this.load();
    } catch (error) {
      this.problem.set(`The token of ${r.name} was not revoked. ${messageOf(error)}`);
    } finally {
      this.busy.set(null);
    }
  }
}
