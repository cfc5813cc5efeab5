import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { Subject, catchError, debounceTime, from, map, of, switchMap, tap } from 'rxjs';
import { CurrentBench } from '../../benches/current-bench';
import { ApiError, messageOf } from '../../core/api-error';
import { AppConfigStore } from '../../core/app-config-store';
import { roleAtLeast } from '../../core/api-types';
import { Notice } from '../../core/notice';
import { applyServerErrors, controlMessage, notBlank } from '../../ui/form-messages';
import { CorporaApi, type CorpusOptionsInput, type CorpusPreview } from '../corpora-api';
import { PersonalDataCaution } from '../personal-data-caution';
import { UploadOptionsForm } from '../upload-options-form/upload-options-form';
import { UploadPreview } from '../upload-preview/upload-preview';

type PreviewState = { kind: 'idle' } | { kind: 'loading' } | { kind: 'ready'; preview: CorpusPreview } | { kind: 'failed'; message: string };

const ACCEPTED = /\.(txt|tsv|csv|tab)$/i;

function sizeText(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB` : `${Math.max(1, Math.round(bytes / 1024))} kB`;
}

/** `/benches/:benchId/corpora/upload`: choose a file, set options, look at the preview, save. */
@Component({
  selector: 'nw-corpus-upload',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    DecimalPipe, RouterLink, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule,
    MatProgressBarModule, PersonalDataCaution, UploadOptionsForm, UploadPreview,
  ],
  templateUrl: './corpus-upload.html',
  styleUrl: './corpus-upload.scss',
})
export class CorpusUpload {
  readonly benchId = input.required<string>();
  protected readonly store = inject(CurrentBench);
  private readonly api = inject(CorporaApi);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly appConfig = inject(AppConfigStore);
  private readonly optionsForm = viewChild.required(UploadOptionsForm);

  protected readonly file = signal<File | null>(null);
  protected readonly fileProblem = signal<string | null>(null);
  protected readonly dragging = signal(false);
  protected readonly options = signal<CorpusOptionsInput | null>({});
  protected readonly state = signal<PreviewState>({ kind: 'idle' });
  protected readonly saving = signal(false);
  protected readonly saveProblem = signal<string | null>(null);
  protected readonly maxBytes = computed(() => this.appConfig.config()?.maxUploadBytes ?? null);
  protected readonly maxText = computed(() => {
    const max = this.maxBytes();
    return max === null ? '…' : sizeText(max);
  });
  protected readonly canUpload = computed(() => {
    const b = this.store.current();
    return b !== null && b.id === this.benchId() && roleAtLeast(b.role, 'member');
  });
  protected readonly preview = computed(() => {
    const s = this.state();
    return s.kind === 'ready' ? s.preview : null;
  });
  protected readonly controlMessage = controlMessage;

  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly details = this.fb.group({
    name: ['', [Validators.required, Validators.maxLength(80), notBlank]],
    description: ['', [Validators.maxLength(500)]],
  });

  /** The name last taken from a file name (replaced when another file is chosen, unless the person edited it). */
  private suggestedName = '';
  private readonly previewRequests = new Subject<{ file: File; options: CorpusOptionsInput }>();

  constructor() {
    void this.appConfig.load();
    effect(() => {
      const id = this.benchId();
      untracked(() => {
        if (this.store.current()?.id !== id) void this.store.open(id);
      });
    });
    this.previewRequests
      .pipe(
        tap(() => this.state.set({ kind: 'loading' })),
        debounceTime(250),
        switchMap(({ file, options }) =>
          from(this.api.preview(this.benchId(), file, options)).pipe(
            map((preview): PreviewState => ({ kind: 'ready', preview })),
            catchError((error: unknown) => of<PreviewState>({ kind: 'failed', message: `The file could not be checked. ${messageOf(error)}` })),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((s) => this.state.set(s));
  }

  protected onOptions(options: CorpusOptionsInput | null): void {
    this.options.set(options);
    this.requestPreview();
  }

  protected onPicked(event: Event): void {
    const inputEl = event.target as HTMLInputElement;
    const file = inputEl.files?.[0] ?? null;
    inputEl.value = '';
    if (file) this.useFile(file);
  }

  protected onDragOver(event: DragEvent): void {
    event.preventDefault();
    this.dragging.set(true);
  }

  protected onDrop(event: DragEvent): void {
    event.preventDefault();
    this.dragging.set(false);
    if (!this.canUpload()) return;
    const files = event.dataTransfer?.files;
    if (!files || files.length === 0) return;
    if (files.length > 1) {
      this.fileProblem.set('Drop one file at a time.');
      return;
    }
    this.useFile(files[0]!);
  }

  private useFile(file: File): void {
    this.saveProblem.set(null);
    const max = this.maxBytes();
    if (!ACCEPTED.test(file.name)) {
      this.fileProblem.set(`"${file.name}" is not a .txt, .tsv or .csv file; choose a word list with one of these extensions.`);
    } else if (max !== null && file.size > max) {
      this.fileProblem.set(`"${file.name}" is ${sizeText(file.size)}, over the upload limit of ${sizeText(max)}; split it or remove rare words.`);
    } else {
      this.fileProblem.set(null);
      this.file.set(file);
      // The name follows the latest file until the person types one of their own.
      const name = this.details.controls.name;
      if (!name.value || name.value === this.suggestedName) {
        const base = file.name.replace(/\.[^.]+$/, '').replace(/[-_]+/g, ' ').trim();
        this.suggestedName = base.charAt(0).toUpperCase() + base.slice(1);
        name.setValue(this.suggestedName);
      }
      this.requestPreview();
      return;
    }
    this.file.set(null);
    this.state.set({ kind: 'idle' });
  }

  private requestPreview(): void {
    const file = this.file();
    const options = this.options();
    if (!file) return;
    if (!this.canUpload()) {
      // The server refuses viewers; say so here instead of sending the file.
      this.state.set({ kind: 'failed', message: 'Viewers cannot upload or check corpora on this bench; the file was not sent.' });
      return;
    }
    if (!options) {
      this.state.set({ kind: 'failed', message: 'Correct the options marked in red to see the preview.' });
      return;
    }
    this.previewRequests.next({ file, options });
  }

  protected mergeDuplicates(): void {
    this.optionsForm().mergeDuplicates();
  }

  protected async save(): Promise<void> {
    this.details.markAllAsTouched();
    const file = this.file();
    const options = this.options();
    const preview = this.preview();
    if (!file || !options || !preview?.ok || this.details.invalid) return;
    this.saving.set(true);
    this.saveProblem.set(null);
    try {
      const { name, description } = this.details.getRawValue();
      const corpus = await this.api.save(this.benchId(), file, options, name.trim(), description.trim());
      this.notice.done(`Saved "${corpus.name}" with ${corpus.types.toLocaleString('en')} words.`);
      await this.router.navigate(['/benches', this.benchId(), 'corpora', corpus.id]);
    } catch (error) {
      if (error instanceof ApiError && error.status === 422 && Object.keys(error.fields).length > 0) {
        const unmatched = applyServerErrors(this.details, error.fields);
        if (unmatched.length > 0) this.saveProblem.set(unmatched.join(' '));
      } else {
        this.saveProblem.set(`Nothing was saved. ${messageOf(error)}`);
      }
      this.requestPreview();
    } finally {
      this.saving.set(false);
    }
  }
}
