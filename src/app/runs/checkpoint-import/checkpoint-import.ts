import { ChangeDetectionStrategy, Component, inject, input, output, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Router } from '@angular/router';
import type { CorpusSummary } from '../../../../shared/api/corpora';
import { decodeCheckpoint, type Checkpoint } from '../../../../shared/model/checkpoint';
import { messageOf } from '../../core/api-error';
import { FAMILY_LABELS } from '../run-labels';
import { RunsApi } from '../runs-api';

/** Reads a checkpoint file, checks it with `decodeCheckpoint` before anything is sent, and makes a run of it. */
@Component({
  selector: 'nw-checkpoint-import',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [FormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  template: `
    <div class="nw-card" data-testid="checkpoint-import">
      <h2>Import a checkpoint</h2>
      <p class="nw-muted">A checkpoint file exported from Noisewright becomes a new run on a corpus of this bench with the same characters.</p>
      <div class="nw-form-row">
        <button mat-stroked-button type="button" (click)="file.click()"><mat-icon>folder_open</mat-icon> Choose file…</button>
        <input #file type="file" hidden accept=".nwck,application/octet-stream" aria-label="Checkpoint file" (change)="read($any($event.target).files)" />
        @if (fileName(); as n) { <span class="nw-mono">{{ n }}</span> }
      </div>
      @if (parsed(); as ck) {
        <p>{{ familyLabels[ck.family] }}, step {{ ck.step }}, {{ ck.alphabet.length }} characters.</p>
      }
      <div class="nw-form-row">
        <mat-form-field>
          <mat-label>Corpus</mat-label>
          <mat-select [(ngModel)]="corpusId" name="corpus">
            @for (c of corpora(); track c.id) { <mat-option [value]="c.id">{{ c.name }}</mat-option> }
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Run name</mat-label>
          <input matInput [(ngModel)]="name" name="name" maxlength="120" />
        </mat-form-field>
      </div>
      @if (problem(); as message) {
        <div class="nw-problem" role="alert"><mat-icon>error</mat-icon><span>{{ message }}</span></div>
      }
      <div class="nw-actions">
        <button mat-flat-button type="button" [disabled]="busy()" (click)="submit()">Import</button>
      </div>
    </div>
  `,
})
export class CheckpointImport {
  readonly benchId = input.required<string>();
  readonly corpora = input.required<CorpusSummary[]>();
  readonly imported = output<string>();
  private readonly api = inject(RunsApi);
  private readonly router = inject(Router);
  protected readonly familyLabels = FAMILY_LABELS;
  protected readonly fileName = signal<string | null>(null);
  protected readonly parsed = signal<Checkpoint | null>(null);
  protected readonly problem = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected corpusId = '';
  protected name = '';
  private bytes: Uint8Array | null = null;

  protected async read(files: FileList | null): Promise<void> {
    const file = files?.[0];
    this.parsed.set(null);
    this.bytes = null;
    if (!file) return;
    this.fileName.set(file.name);
    try {
      const bytes = new Uint8Array(await file.arrayBuffer());
      this.parsed.set(decodeCheckpoint(bytes));
      this.bytes = bytes;
      this.problem.set(null);
      if (!this.name) this.name = file.name.replace(/\.[^.]+$/, '');
    } catch (error) {
      this.problem.set(error instanceof Error ? error.message : 'This file could not be read; choose a checkpoint file.');
    }
  }

  protected async submit(): Promise<void> {
    if (!this.bytes) return this.problem.set(this.problem() ?? 'Choose a checkpoint file first.');
    if (!this.corpusId) return this.problem.set('Choose the corpus the checkpoint was trained on.');
    if (!this.name.trim()) return this.problem.set('Give the new run a name.');
    this.busy.set(true);
    try {
      const run = await this.api.importRun(this.benchId(), this.corpusId, this.name.trim(), this.bytes, this.fileName() ?? 'checkpoint.nwck');
      this.imported.emit(run.id);
      await this.router.navigate(['/benches', this.benchId(), 'runs', run.id]);
    } catch (error) {
      this.problem.set(messageOf(error));
    } finally {
      this.busy.set(false);
    }
  }
}
