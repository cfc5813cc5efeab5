import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { catchError, combineLatest, debounceTime, distinctUntilChanged, from, map, of, switchMap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { CorporaApi, type CorpusWordRow, type WordPageRequest, type WordSort } from '../corpora-api';

type SplitFilter = WordPageRequest['split'];

/** The words of a corpus, sorted, filtered and paged on the server. */
@Component({
  selector: 'nw-corpus-words-table',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    DecimalPipe, ReactiveFormsModule, MatTableModule, MatSortModule, MatPaginatorModule, MatFormFieldModule,
    MatInputModule, MatSelectModule, MatIconModule, MatProgressBarModule,
  ],
  templateUrl: './corpus-words-table.html',
  styles: `.filters { display: flex; gap: 12px; flex-wrap: wrap; align-items: flex-start; }
    .filters .search { width: 260px; } .filters .split { width: 170px; }
    .split-cell { text-transform: capitalize; }`,
})
export class CorpusWordsTable {
  readonly benchId = input.required<string>();
  readonly corpusId = input.required<string>();
  private readonly api = inject(CorporaApi);

  protected readonly columns = ['word', 'count', 'length', 'split'];
  protected readonly search = new FormControl('', { nonNullable: true });
  protected readonly splitFilter = new FormControl<SplitFilter>('', { nonNullable: true });
  protected readonly filters = signal<{ q: string; split: SplitFilter }>({ q: '', split: '' });
  protected readonly sort = signal<{ sort: WordSort; dir: 'asc' | 'desc' }>({ sort: 'count', dir: 'desc' });
  protected readonly page = signal({ index: 0, size: 25 });
  protected readonly rows = signal<CorpusWordRow[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(true);
  protected readonly problem = signal<string | null>(null);

  constructor() {
    const query$ = combineLatest([
      toObservable(this.benchId),
      toObservable(this.corpusId),
      toObservable(this.filters),
      toObservable(this.sort),
      toObservable(this.page),
    ]);
    query$
      .pipe(
        map(([benchId, corpusId, { q, split }, sort, page]) => ({
          benchId, corpusId,
          req: { sort: sort.sort, dir: sort.dir, q, split, offset: page.index * page.size, limit: page.size } satisfies WordPageRequest,
        })),
        distinctUntilChanged((a, b) => JSON.stringify(a) === JSON.stringify(b)),
        switchMap(({ benchId, corpusId, req }) => {
          this.loading.set(true);
          return from(this.api.words(benchId, corpusId, req)).pipe(
            map((page) => ({ page, problem: null as string | null })),
            catchError((error: unknown) => of({ page: null, problem: `Could not load the words. ${messageOf(error)}` })),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe(({ page, problem }) => {
        this.loading.set(false);
        this.problem.set(problem);
        if (page) {
          this.rows.set(page.items);
          this.total.set(page.total);
        }
      });
    // A new filter starts again at the first page (both signals change in one tick: one request).
    this.search.valueChanges
      .pipe(debounceTime(250), map((q) => q.trim()), distinctUntilChanged(), takeUntilDestroyed())
      .subscribe((q) => {
        this.filters.update((f) => ({ ...f, q }));
        this.firstPage();
      });
    this.splitFilter.valueChanges.pipe(takeUntilDestroyed()).subscribe((split) => {
      this.filters.update((f) => ({ ...f, split }));
      this.firstPage();
    });
    effect(() => {
      this.corpusId();
      untracked(() => this.firstPage());
    });
  }

  private firstPage(): void {
    if (this.page().index !== 0) this.page.update((p) => ({ ...p, index: 0 }));
  }

  protected onSort(sort: Sort): void {
    const column = sort.active as WordSort;
    const dir = sort.direction === '' ? (column === 'word' ? 'asc' : 'desc') : sort.direction;
    this.sort.set({ sort: column, dir });
    this.firstPage();
  }

  protected onPage(event: PageEvent): void {
    this.page.set({ index: event.pageIndex, size: event.pageSize });
  }
}
