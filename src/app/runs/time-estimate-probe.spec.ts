import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { CorporaApi } from '../corpora/corpora-api';
import type { ProbeRequest, TrainerSettings } from '../workers/trainer-api';
import { TRAINER_FACTORY } from '../workers/trainer-client';
import { TimeProbe } from './time-estimate-probe';

const SETTINGS: TrainerSettings = {
  family: 'ssm', stateSize: 8, generativeFlow: ['coupling', 'diag'], inferenceFlow: ['diag'], flowHidden: 16, encoderSize: 24,
  embeddingSize: 8, proposalHidden: 16, observationHidden: 0, samples: 4, batchSize: 2, steps: 100, learningRate: 0.01,
  clipNorm: 5, warmupSteps: 0, regime: 'token', seed: 3, order: 3, evalEvery: 20,
};
const RESULT = { secondsPerStep: 0.1, secondsPerEvaluation: 1, setupSeconds: 2, timedSteps: 3, wordLength: 2, backend: 'wasm', parameterCount: 9, probeSeconds: 4 };

function setUp(probe: (r: ProbeRequest) => Promise<typeof RESULT>) {
  const requests: ProbeRequest[] = [];
  const closed = vi.fn();
  const factory = vi.fn(() => ({ api: { probe: (r: ProbeRequest) => { requests.push(r); return probe(r); } }, close: closed }));
  // Lengths 1 and 2 with equal token counts; length 4 only as a type.
  const histogram = [{ length: 1, types: 1, tokens: 5 }, { length: 2, types: 1, tokens: 5 }, { length: 4, types: 2, tokens: 0 }];
  TestBed.configureTestingModule({
    providers: [
      provideZonelessChangeDetection(),
      { provide: TRAINER_FACTORY, useValue: factory },
      { provide: CorporaApi, useValue: { get: async () => ({ stats: { lengthHistogram: histogram } }) } },
    ],
  });
  return { probe: TestBed.inject(TimeProbe), requests, closed, factory };
}

describe('TimeProbe', () => {
  it('probes in a worker of its own with the typical longest word of a batch, then closes it and reuses the result', async () => {
    const { probe, requests, closed, factory } = setUp(async () => RESULT);
    expect(await probe.measure('b1', 'c1', 26, SETTINGS)).toEqual(RESULT);
    // Two draws by token from lengths {1, 2} (equal weight): E[max] = 0.25·1 + 0.75·2 = 1.75 → 2 (hand-worked order statistics).
    expect(requests[0]).toMatchObject({ alphabetSize: 26, wordLength: 2 });
    // Token-weighted mean length (1·5 + 2·5) / 10 = 1.5 → 2 for the validation words.
    expect(requests[0]!.validationWordLength).toBe(2);
    expect(closed).toHaveBeenCalledTimes(1);
    await probe.measure('b1', 'c1', 26, { ...SETTINGS, steps: 5000, seed: 9 }); // steps and seed do not change the step time
    expect(factory).toHaveBeenCalledTimes(1);
  });

  it('cancel ends a running probe: the promise rejects with a message and the worker is closed', async () => {
    const { probe, closed } = setUp(() => new Promise(() => {}));
    const pending = probe.measure('b1', 'c1', 26, SETTINGS);
    await new Promise((r) => setTimeout(r, 0));
    probe.cancel();
    await expect(pending).rejects.toThrow('The time probe was stopped.');
    expect(closed).toHaveBeenCalledTimes(1);
  });
});
