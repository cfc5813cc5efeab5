/**
 * What comparisons read beyond the runs API: each run's latest stored evaluation (for cross entropy and noise
 * information). Calls the evaluations part of the REST API (DEVELOPERS.md, "REST API").
 */
import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { EvaluationDto, EvaluationPage } from '../../../shared/api/evaluations';
import { comparisonEvaluation } from '../../../shared/api/reports';
import type { RunDto } from '../../../shared/api/runs';
import type { EvaluationFigures } from './compare-rows';

const enc = encodeURIComponent;

@Injectable({ providedIn: 'root' })
export class ComparisonSources {
  private readonly http = inject(HttpClient);

  /** Figures of each run's newest evaluation; runs without one (or when the request fails) are left out. */
  async evaluationFigures(benchId: string, runs: RunDto[]): Promise<Record<string, EvaluationFigures | undefined>> {
    const out: Record<string, EvaluationFigures | undefined> = {};
    await Promise.all(runs.map(async (run) => {
      try {
        const params = new HttpParams().set('runId', run.id).set('limit', 1);
        const page = await firstValueFrom(this.http.get<EvaluationPage>(`/api/benches/${enc(benchId)}/evaluations`, { params }));
        const newest = page.items[0];
        if (!newest) return;
        const full = await firstValueFrom(this.http.get<EvaluationDto>(`/api/benches/${enc(benchId)}/evaluations/${enc(newest.id)}`));
        out[run.id] = comparisonEvaluation(full);
      } catch {
        // No evaluation figures for this run: the table shows "—".
      }
    }));
    return out;
  }
}
