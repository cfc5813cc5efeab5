import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type {
  CorpusDetail, CorpusOptionsInput, CorpusPreview, CorpusSummary, CorpusWordPage, UpdateCorpusRequest, WordSort,
} from '../../../shared/api/corpora';

export type {
  CorpusDetail, CorpusOptionsInput, CorpusPreview, CorpusSummary, CorpusWordPage, CorpusWordRow, CorpusStats, Problem, SplitName, WordSort,
} from '../../../shared/api/corpora';

export interface WordPageRequest {
  sort: WordSort;
  dir: 'asc' | 'desc';
  q: string;
  split: '' | 'train' | 'validation' | 'test';
  offset: number;
  limit: number;
}

const base = (benchId: string) => `/api/benches/${encodeURIComponent(benchId)}/corpora`;

function uploadForm(file: File, options: CorpusOptionsInput, extra: Record<string, string> = {}): FormData {
  const form = new FormData();
  form.append('options', JSON.stringify(options));
  for (const [key, value] of Object.entries(extra)) form.append(key, value);
  form.append('file', file, file.name);
  return form;
}

/** Calls of the corpora part of the REST API (DEVELOPERS.md). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class CorporaApi {
  private readonly http = inject(HttpClient);

  list(benchId: string): Promise<CorpusSummary[]> {
    return firstValueFrom(this.http.get<CorpusSummary[]>(base(benchId)));
  }

  get(benchId: string, corpusId: string): Promise<CorpusDetail> {
    return firstValueFrom(this.http.get<CorpusDetail>(`${base(benchId)}/${encodeURIComponent(corpusId)}`));
  }

  /** Parses the file on the server and returns words, problems and statistics; stores nothing. */
  preview(benchId: string, file: File, options: CorpusOptionsInput): Promise<CorpusPreview> {
    return firstValueFrom(this.http.post<CorpusPreview>(`${base(benchId)}/preview`, uploadForm(file, options)));
  }

  save(benchId: string, file: File, options: CorpusOptionsInput, name: string, description: string): Promise<CorpusDetail> {
    return firstValueFrom(this.http.post<CorpusDetail>(base(benchId), uploadForm(file, options, { name, description })));
  }

  words(benchId: string, corpusId: string, req: WordPageRequest): Promise<CorpusWordPage> {
    let params = new HttpParams().set('sort', req.sort).set('dir', req.dir).set('offset', req.offset).set('limit', req.limit);
    if (req.q) params = params.set('q', req.q);
    if (req.split) params = params.set('split', req.split);
    return firstValueFrom(this.http.get<CorpusWordPage>(`${base(benchId)}/${encodeURIComponent(corpusId)}/words`, { params }));
  }

  update(benchId: string, corpusId: string, changes: UpdateCorpusRequest): Promise<CorpusDetail> {
    return firstValueFrom(this.http.patch<CorpusDetail>(`${base(benchId)}/${encodeURIComponent(corpusId)}`, changes));
  }

  /** `confirmArchivedRuns`: the caller knows archived runs use the corpus and deletes it anyway. */
  remove(benchId: string, corpusId: string, confirmArchivedRuns = false): Promise<void> {
    const params = confirmArchivedRuns ? new HttpParams().set('confirmArchivedRuns', 'true') : undefined;
    return firstValueFrom(this.http.delete<void>(`${base(benchId)}/${encodeURIComponent(corpusId)}`, { params }));
  }

  /** The export as a Blob (the request needs the sign-in token, so a plain link would not work). */
  exportTsv(benchId: string, corpusId: string): Promise<Blob> {
    return firstValueFrom(this.http.get(`${base(benchId)}/${encodeURIComponent(corpusId)}/export.tsv`, { responseType: 'blob' }));
  }
}
