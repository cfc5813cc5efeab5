import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { CorpusSummary } from '../../../shared/api/corpora';
import type {
  CheckpointDto, CheckpointReason, CreateRunRequest, ListRunsQuery, MetricBatchRequest, MetricSeriesPage, RunDto, RunPage,
  TrainingSet as CorpusTrainingSet, UpdateRunRequest,
} from '../../../shared/api/runs';

const enc = encodeURIComponent;

/** Calls of the runs part of the REST API (DEVELOPERS.md, "REST API"). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class RunsApi {
  private readonly http = inject(HttpClient);

  private base(benchId: string): string {
    return `/api/benches/${enc(benchId)}/runs`;
  }

  list(benchId: string, query: ListRunsQuery): Promise<RunPage> {
    let params = new HttpParams();
    for (const [k, v] of Object.entries(query)) if (v !== undefined && v !== '' && v !== null) params = params.set(k, String(v));
    return firstValueFrom(this.http.get<RunPage>(this.base(benchId), { params }));
  }

  get(benchId: string, runId: string): Promise<RunDto> {
    return firstValueFrom(this.http.get<RunDto>(`${this.base(benchId)}/${enc(runId)}`));
  }

  create(benchId: string, body: CreateRunRequest): Promise<RunDto> {
    return firstValueFrom(this.http.post<RunDto>(this.base(benchId), body));
  }

  update(benchId: string, runId: string, body: UpdateRunRequest): Promise<RunDto> {
    return firstValueFrom(this.http.patch<RunDto>(`${this.base(benchId)}/${enc(runId)}`, body));
  }

  addMetrics(benchId: string, runId: string, body: MetricBatchRequest): Promise<unknown> {
    return firstValueFrom(this.http.post(`${this.base(benchId)}/${enc(runId)}/metrics`, body));
  }

  metrics(benchId: string, runId: string, series: string[], sinceStep?: number): Promise<MetricSeriesPage> {
    let params = new HttpParams().set('series', series.join(','));
    if (sinceStep !== undefined) params = params.set('sinceStep', sinceStep);
    return firstValueFrom(this.http.get<MetricSeriesPage>(`${this.base(benchId)}/${enc(runId)}/metrics`, { params }));
  }

  /** Drops metric points after a step (before resuming from an earlier checkpoint). */
  truncateMetrics(benchId: string, runId: string, afterStep: number): Promise<unknown> {
    const params = new HttpParams().set('afterStep', afterStep);
    return firstValueFrom(this.http.delete(`${this.base(benchId)}/${enc(runId)}/metrics`, { params }));
  }

  checkpoints(benchId: string, runId: string): Promise<CheckpointDto[]> {
    return firstValueFrom(this.http.get<CheckpointDto[]>(`${this.base(benchId)}/${enc(runId)}/checkpoints`));
  }

  /**
   * The absolute address a worker POSTs checkpoint bytes to (`POST …/runs/:runId/checkpoints`); the worker
   * sends the bytes itself so the page's main thread does no work for a save.
   */
  checkpointUploadUrl(benchId: string, runId: string, reason: Exclude<CheckpointReason, 'import'>, boundBitsPerChar?: number): string {
    const params = new URLSearchParams({ reason });
    if (boundBitsPerChar !== undefined && Number.isFinite(boundBitsPerChar)) params.set('boundBitsPerChar', String(boundBitsPerChar));
    return new URL(`${this.base(benchId)}/${enc(runId)}/checkpoints?${params}`, globalThis.location.href).href;
  }

  downloadCheckpoint(benchId: string, runId: string, checkpointId: string): Promise<Uint8Array> {
    return firstValueFrom(this.http.get(`${this.base(benchId)}/${enc(runId)}/checkpoints/${enc(checkpointId)}/file`, { responseType: 'arraybuffer' }))
      .then((b) => new Uint8Array(b));
  }

  /** A new run from a checkpoint file (multipart: `file`, `corpusId`, `name`), on a corpus with the checkpoint's characters. */
  importRun(benchId: string, corpusId: string, name: string, bytes: Uint8Array, fileName: string): Promise<RunDto> {
    const form = new FormData();
    form.set('corpusId', corpusId);
    form.set('name', name);
    form.set('file', new Blob([bytesBody(bytes)], { type: 'application/octet-stream' }), fileName);
    return firstValueFrom(this.http.post<RunDto>(`${this.base(benchId)}/import`, form));
  }

  corpora(benchId: string): Promise<CorpusSummary[]> {
    return firstValueFrom(this.http.get<CorpusSummary[]>(`/api/benches/${enc(benchId)}/corpora`));
  }

  trainingSet(benchId: string, corpusId: string): Promise<CorpusTrainingSet> {
    return firstValueFrom(this.http.get<CorpusTrainingSet>(`/api/benches/${enc(benchId)}/corpora/${enc(corpusId)}/training-set`));
  }
}

/** An exact-length ArrayBuffer for the request body (a Uint8Array view may sit inside a larger buffer). */
function bytesBody(bytes: Uint8Array): ArrayBuffer {
  return bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength
    ? (bytes.buffer as ArrayBuffer)
    : (bytes.slice().buffer as ArrayBuffer);
}
