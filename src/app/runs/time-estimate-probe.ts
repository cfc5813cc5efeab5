/**
 * Runs the time probe of the new-run form in a training worker of its own (so the page's thread stays free and
 * the figure is the worker's real pace on this computer), with synthetic words as long as the corpus's typical
 * batch; one probe per configuration is kept, the total is recomputed when only the steps change.
 */
import { Injectable, inject } from '@angular/core';
import { CorporaApi } from '../corpora/corpora-api';
import type { ProbeRequest, ProbeResult, TrainerSettings } from '../workers/trainer-api';
import { fromBoundaryError, TRAINER_FACTORY } from '../workers/trainer-client';
import { expectedLongestWord, lengthWeightsOf, meanLength } from './time-estimate';

/** Word length used when the corpus's lengths are unknown (common practice for names and words: no source). */
export const FALLBACK_WORD_LENGTH = 12;

@Injectable({ providedIn: 'root' })
export class TimeProbe {
  private readonly corpora = inject(CorporaApi);
  private readonly factory = inject(TRAINER_FACTORY);
  private readonly probes = new Map<string, Promise<ProbeResult>>();
  private readonly lengths = new Map<string, Promise<{ length: number; types: number; tokens: number }[]>>();
  private readonly cancels = new Set<() => void>();

  /** Ends every probe still running (its worker is terminated; its promise rejects). */
  cancel(): void {
    for (const stop of [...this.cancels]) stop();
  }

  /** Timings of `settings` on this computer (cached per configuration, corpus and typical word length). */
  async measure(benchId: string, corpusId: string, alphabetSize: number, settings: TrainerSettings): Promise<ProbeResult> {
    const histogram = await this.histogram(benchId, corpusId).catch(() => []);
    const weights = lengthWeightsOf(histogram, settings.regime);
    const longest = expectedLongestWord(weights, settings.batchSize);
    const wordLength = Math.max(1, Math.round(longest > 0 ? longest : FALLBACK_WORD_LENGTH));
    // The live measurements use the most frequent held-out words: the token-weighted mean length stands for them.
    const validationWordLength = Math.max(1, Math.round(meanLength(lengthWeightsOf(histogram, 'token')) || FALLBACK_WORD_LENGTH));
    const probeSettings = { ...settings, steps: 1, seed: 1 };
    const key = JSON.stringify([probeSettings, alphabetSize, wordLength, validationWordLength]);
    let probe = this.probes.get(key);
    if (!probe) {
      probe = this.run({ settings: probeSettings, alphabetSize, wordLength, validationWordLength });
      this.probes.set(key, probe);
      probe.catch(() => this.probes.delete(key));
    }
    return probe;
  }

  private histogram(benchId: string, corpusId: string) {
    let h = this.lengths.get(corpusId);
    if (!h) {
      h = this.corpora.get(benchId, corpusId).then((c) => c.stats.lengthHistogram);
      this.lengths.set(corpusId, h);
      h.catch(() => this.lengths.delete(corpusId));
    }
    return h;
  }

  private async run(request: ProbeRequest): Promise<ProbeResult> {
    const handle = this.factory();
    let stop = () => {};
    const stopped = new Promise<never>((_, reject) => { stop = () => reject(new Error('The time probe was stopped.')); });
    this.cancels.add(stop);
    try {
      return await Promise.race([handle.api.probe(request), stopped]);
    } catch (e) {
      throw new Error(fromBoundaryError(e).message);
    } finally {
      this.cancels.delete(stop);
      handle.close();
    }
  }
}
