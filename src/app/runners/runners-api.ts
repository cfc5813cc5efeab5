import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { CreatedRunner, RunControlAction, RunnerAvailability, RunnersOverview } from '../../../shared/api/runners';
import type { RunDto } from '../../../shared/api/runs';

const enc = encodeURIComponent;

/** Calls of the runners part of the REST API (shared/api/runners.ts). Failures arrive as ApiError. */
@Injectable({ providedIn: 'root' })
export class RunnersApi {
  private readonly http = inject(HttpClient);

  /** Runners, queue depth and back-end (instance admin). */
  overview(): Promise<RunnersOverview> {
    return firstValueFrom(this.http.get<RunnersOverview>('/api/runners'));
  }

  /** A new runner token (instance admin); the token is in this answer only. */
  create(name: string): Promise<CreatedRunner> {
    return firstValueFrom(this.http.post<CreatedRunner>('/api/runners', { name }));
  }

  /** Revokes a runner's token: its next call is refused and the runs it held go back to the queue. */
  revoke(runnerId: string): Promise<unknown> {
    return firstValueFrom(this.http.delete(`/api/runners/${enc(runnerId)}`));
  }

  /** What the forms need to offer "Send to runners" on a bench. */
  availability(benchId: string): Promise<RunnerAvailability> {
    return firstValueFrom(this.http.get<RunnerAvailability>(`/api/benches/${enc(benchId)}/runner-status`));
  }

  /** Pause, resume or stop a run (a runner sees it within one progress interval). */
  control(benchId: string, runId: string, action: RunControlAction): Promise<RunDto> {
    return firstValueFrom(this.http.post<RunDto>(`/api/benches/${enc(benchId)}/runs/${enc(runId)}/control`, { action }));
  }
}
