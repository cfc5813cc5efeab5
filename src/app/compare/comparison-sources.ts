/**
 * What comparisons read beyond the runs API: each run's latest stored evaluation (for cross entropy and noise
 * information). Calls the evaluations part of the REST API (DEVELOPERS.md, "REST API").
 */
import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import type { EvaluationDto, EvaluationPage } from '../../../shared/api/evaluations';
import type { RunDto } from '../../../shared/api/runs';
import type { EvaluationFigures } from './compare-rows';

const enc = encodeURIComponent;

/**
 * The comparison's figures of one evaluation: held-out cost with its standard error (tight estimate for the
 * SSM, exact for GRU and n-gram), the sequence cross entropy (exact for GRU and n-gram) and the mean noise MI.
 */
export function figuresOf(e: EvaluationDto): EvaluationFigures {
  const r = e.results;
  if (r.family === 'ssm') {
    return {
      crossEntropyBitsPerWord: r.crossEntropy.shared.crossEntropyBits, meanNoiseInformationBits: r.noise.meanBits,
      heldOutBitsPerChar: r.tight.bitsPerChar, heldOutBitsPerWord: r.tight.bitsPerWord,
      heldOutSeBitsPerChar: r.tight.standardError?.bitsPerChar.total ?? null,
      heldOutSeBitsPerWord: r.tight.standardError?.bitsPerWord.total ?? null,
    };
  }
  return {
    crossEntropyBitsPerWord: r.crossEntropy.crossEntropyBits, meanNoiseInformationBits: null,
    heldOutBitsPerChar: r.heldOut.bitsPerChar, heldOutBitsPerWord: r.heldOut.bitsPerWord,
    heldOutSeBitsPerChar: r.heldOut.standardError?.bitsPerChar ?? null,
    heldOutSeBitsPerWord: r.heldOut.standardError?.bitsPerWord ?? null,
  };
}

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
        out[run.id] = figuresOf(full);
      } catch {
        // No evaluation figures for this run: the table shows "—".
      }
    }));
    return out;
  }
}
