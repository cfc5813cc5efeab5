import { DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import type { CorpusPreview, SplitName } from '../corpora-api';
import { groupProblems } from './problem-groups';

/** What the server read from the file: figures, problems grouped by line, split counts and a word sample. */
@Component({
  selector: 'nw-upload-preview',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [DecimalPipe, PercentPipe, MatTableModule, MatButtonModule, MatIconModule],
  templateUrl: './upload-preview.html',
  styleUrl: './upload-preview.scss',
})
export class UploadPreview {
  readonly preview = input.required<CorpusPreview>();
  /** Asks the page to switch on merging of repeated words. */
  readonly mergeRequested = output<void>();

  protected readonly groups = computed(() => groupProblems(this.preview().problems));
  protected readonly warningCount = computed(() => this.preview().problems.filter((p) => p.severity === 'warning').length);
  protected readonly hasDuplicates = computed(() => (this.preview().problemCounts['duplicate-word'] ?? 0) > 0);
  protected readonly splits: SplitName[] = ['train', 'validation', 'test'];
  protected readonly sampleColumns = ['word', 'count', 'length'];
  protected readonly sample = computed(() => this.preview().sample.slice(0, 12));
  protected readonly alphabetText = computed(() => this.preview().alphabet.join(' '));
}
