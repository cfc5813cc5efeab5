import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { EvaluationRequestDto } from '../../../shared/api/evaluation-jobs';
import type { CreateEvaluationRequest, EvaluationDto, EvaluationSettingsInput, EvaluationSummaryDto } from '../../../shared/api/evaluations';

const enc = encodeURIComponent;

/**
 * Evaluations stored before the held-out split and the n-gram order were settings lack them; they were computed
 * with the defaults (test, order 3), which are filled in here so every page can show them.
 */
function withDefaults<T extends EvaluationSummaryDto>(e: T): T {
  return { ...e, settings: { ...e.settings, heldOutSplit: e.settings.heldOutSplit ?? 'test', ngramOrder: e.settings.ngramOrder ?? 3 } };
}

/** Stored evaluations of a checkpoint (DEVELOPERS.md, "REST API"). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class EvaluationsApi {
  private readonly http = inject(HttpClient);

  private base(benchId: string, runId: string, checkpointId: string): string {
    return `/api/benches/${enc(benchId)}/runs/${enc(runId)}/checkpoints/${enc(checkpointId)}/evaluations`;
  }

  /** The evaluations stored for a checkpoint, newest first (without their figures). */
  list(benchId: string, runId: string, checkpointId: string): Promise<EvaluationSummaryDto[]> {
    return firstValueFrom(this.http.get<EvaluationSummaryDto[] | { items: EvaluationSummaryDto[] }>(this.base(benchId, runId, checkpointId)))
      .then((r) => (Array.isArray(r) ? r : r.items).map(withDefaults));
  }

  get(benchId: string, evaluationId: string): Promise<EvaluationDto> {
    return firstValueFrom(this.http.get<EvaluationDto>(`/api/benches/${enc(benchId)}/evaluations/${enc(evaluationId)}`)).then(withDefaults);
  }

  create(benchId: string, runId: string, checkpointId: string, body: CreateEvaluationRequest): Promise<EvaluationDto> {
    return firstValueFrom(this.http.post<EvaluationDto>(this.base(benchId, runId, checkpointId), body)).then(withDefaults);
  }

  /** Sends the evaluation to the runners (the same request again returns the one that waits or runs). */
  request(benchId: string, runId: string, checkpointId: string, settings: EvaluationSettingsInput): Promise<EvaluationRequestDto> {
    return firstValueFrom(this.http.post<EvaluationRequestDto>(`${this.base(benchId, runId, checkpointId).replace(/evaluations$/, 'evaluation-requests')}`, { settings }));
  }

  /** The evaluations sent to runners for a checkpoint, newest first. */
  requests(benchId: string, runId: string, checkpointId: string): Promise<EvaluationRequestDto[]> {
    return firstValueFrom(this.http.get<EvaluationRequestDto[]>(this.base(benchId, runId, checkpointId).replace(/evaluations$/, 'evaluation-requests')));
  }

  requestState(benchId: string, requestId: string): Promise<EvaluationRequestDto> {
    return firstValueFrom(this.http.get<EvaluationRequestDto>(`/api/benches/${enc(benchId)}/evaluation-requests/${enc(requestId)}`));
  }

  /** Withdraws a request that waits for a runner or failed (409 while a runner computes it). */
  withdrawRequest(benchId: string, requestId: string): Promise<void> {
    return firstValueFrom(this.http.delete<void>(`/api/benches/${enc(benchId)}/evaluation-requests/${enc(requestId)}`));
  }
}
