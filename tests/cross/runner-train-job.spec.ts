// One training job of the runner program (runner/train-job.ts) against a stand-in for the server's runner routes
// (it only records what the job sends): the checkpoints it saves when a stop comes right after an autosave.
import { beforeAll, describe, expect, it } from 'vitest';
import type { RunnerJob } from '../../shared/api/runner-jobs';
import type { TrainingSet } from '../../shared/api/runs';
import { initNodeBackend } from '../../shared/node/tf-node';
import type { RunnerApi } from '../../runner/runner-api';
import { trainJob, type JobCommand } from '../../runner/train-job';

const WORDS = ['ka', 'ko', 'kaka', 'oka', 'ako', 'koka', 'okako', 'kako', 'akka', 'ok', 'ao', 'oak'];
const SET: TrainingSet = { alphabet: ['a', 'k', 'o'], words: WORDS, counts: WORDS.map((_, i) => 1 + (i % 3)), splits: WORDS.map((_, i) => (i % 4 === 3 ? 'validation' : 'train')) } as TrainingSet;

const JOB: RunnerJob = {
  runId: '0f6f3f4e-8a47-4b55-9a1d-2c7f0b1e9a10', benchId: 'b1', runName: 'Stop after an autosave', family: 'gru',
  settings: {
    model: { stateSize: 4, embeddingSize: 3, observationHidden: 0 },
    training: { steps: 100, batchSize: 8, learningRate: 0.01, clipNorm: 5, evalEvery: 0, checkpointEvery: 20, seed: 3 },
  } as RunnerJob['settings'],
  alphabet: ['a', 'k', 'o'], stepsDone: 0, checkpoint: null, leaseSeconds: 45, progressEverySeconds: 5,
};

beforeAll(async () => { await initNodeBackend('wasm'); });

describe('runner training job', () => {
  it('stops right after the autosave of step 40 without a second checkpoint of the same weights', async () => {
    const uploads: { reason: string; step: number }[] = [];
    let lastStep = 0;
    const api = {
      trainingSet: async () => SET,
      progress: async () => ({ action: null }),
      metrics: async () => ({ stored: 0 }),
      uploadCheckpoint: async (_runId: string, bytes: Uint8Array, reason: string) => {
        uploads.push({ reason, step: lastStep });
        return { id: `ck${uploads.length}`, step: lastStep, bytes: bytes.length };
      },
      finish: async () => undefined,
    } as unknown as RunnerApi;
    const result = await trainJob(JOB, api, {
      // Asked before every step: stop once step 40 (an autosave step) has been reported.
      command: (): JobCommand | null => (lastStep >= 40 ? 'stop' : null),
      onProgress: (p) => { lastStep = p.step; },
      backend: { backend: 'wasm', simd: false, threads: 1 },
      progressEveryMs: 0,
    });
    expect(result).toMatchObject({ status: 'stopped', step: 40 });
    expect(uploads).toEqual([{ reason: 'auto', step: 20 }, { reason: 'auto', step: 40 }]);
  });
});
