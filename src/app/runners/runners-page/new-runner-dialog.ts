import { ClipboardModule } from '@angular/cdk/clipboard';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { CreatedRunner, QueueBackend } from '../../../../shared/api/runners';
import { formProblem } from '../../ui/form-messages';
import { RunnersApi } from '../runners-api';

export interface NewRunnerDialogData { backend: QueueBackend }

/** The command that starts a runner with a token against this server (`npm run runner`, see README "Scale out"). */
export function runnerCommand(origin: string, token: string, backend: QueueBackend): string {
  const queue = backend === 'bullmq' ? ' --queue <the QUEUE_URL of the server>' : '';
  return `npm run runner -- --server ${origin} --token ${token}${queue}`;
}

/** Names a new runner, then shows its token once, with copy buttons and the command line that starts it. */
@Component({
  selector: 'nw-new-runner-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ClipboardModule, ReactiveFormsModule, MatButtonModule, MatDialogModule, MatFormFieldModule, MatIconModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>New runner token</h2>
    <mat-dialog-content>
      @if (created(); as c) {
        <p>The token of <strong>{{ c.runner.name }}</strong> is shown <strong>only now</strong>: copy it before closing. Keep it like a password;
          revoke it on the Runners page if it leaks.</p>
        <div class="copy-line">
          <code class="nw-mono" data-testid="runner-token">{{ c.token }}</code>
          <button mat-icon-button type="button" [cdkCopyToClipboard]="c.token" (cdkCopyToClipboardCopied)="copied.set('token')" aria-label="Copy the token">
            <mat-icon>content_copy</mat-icon></button>
        </div>
        <p>Start the runner on the machine that should train (one thread per core by default; <code>--threads N</code> sets it):</p>
        <div class="copy-line">
          <code class="nw-mono" data-testid="runner-command">{{ command() }}</code>
          <button mat-icon-button type="button" [cdkCopyToClipboard]="command()" (cdkCopyToClipboardCopied)="copied.set('command')" aria-label="Copy the command">
            <mat-icon>content_copy</mat-icon></button>
        </div>
        @if (copied(); as what) { <p class="note" role="status">{{ what === 'token' ? 'Token' : 'Command' }} copied.</p> }
      } @else {
        <p>A runner is a process that trains runs off the browser tab. Name it after the machine it runs on.</p>
        <mat-form-field class="wide">
          <mat-label>Runner name</mat-label>
          <input matInput [formControl]="name" maxlength="80" (keydown.enter)="create()" />
          <mat-error>Name the runner (at most 80 characters), e.g. the machine it runs on.</mat-error>
        </mat-form-field>
        @if (problem(); as m) { <p class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ m }}</span></p> }
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      @if (created()) {
        <button mat-flat-button [mat-dialog-close]="true">Done</button>
      } @else {
        <button mat-button [mat-dialog-close]="false">Cancel</button>
        <button mat-flat-button type="button" (click)="create()" [disabled]="busy()">Create token</button>
      }
    </mat-dialog-actions>
  `,
  styles: `
    .wide { width: 100%; }
    .copy-line { display: flex; align-items: center; gap: 8px; background: var(--mat-sys-surface-container); border-radius: 8px; padding: 4px 4px 4px 12px; }
    .copy-line code { flex: 1; overflow-wrap: anywhere; font-size: 0.85rem; }
    .note { color: var(--mat-sys-on-surface-variant); margin: 4px 0 0; }
  `,
})
export class NewRunnerDialog {
  protected readonly data = inject<NewRunnerDialogData>(MAT_DIALOG_DATA);
  private readonly api = inject(RunnersApi);
  protected readonly name = new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.maxLength(80), Validators.pattern(/\S/)] });
  private readonly group = new FormGroup({ name: this.name });
  protected readonly created = signal<CreatedRunner | null>(null);
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);
  protected readonly copied = signal<'token' | 'command' | null>(null);
  protected readonly command = computed(() => {
    const c = this.created();
    return c ? runnerCommand(globalThis.location.origin, c.token, this.data.backend) : '';
  });

  protected async create(): Promise<void> {
    this.name.markAsTouched();
    if (this.name.invalid || this.busy()) return;
    this.busy.set(true);
    this.problem.set(null);
    try {
      this.created.set(await this.api.create(this.name.value.trim()));
    } catch (error) {
      this.problem.set(formProblem(error, this.group, 'The token was not created.'));
    } finally {
      this.busy.set(false);
    }
  }
}
