/**
 * The real `TrainerApi` implementation: one run's model, its training loop and the live measurements. The
 * worker entry (`trainer.worker.ts`) exposes an instance with comlink; tests expose it over an in-thread
 * `MessageChannel`. The loop yields to the event loop every few tens of milliseconds so that pause, stop and
 * checkpoint requests are served between steps, and throttles progress messages so the page stays idle. The loop
 * itself is the shared one (shared/training/training-loop.ts), the same as `npm run train` and the runners use.
 */
import { transfer } from 'comlink';
import { decodeCheckpoint, encodeCheckpoint } from '../../../shared/model/checkpoint';
import { TrainerError, TrainerErrorCode, toTrainerError } from '../../../shared/model/trainer-errors';
import { createEngine, type RunEngine } from '../../../shared/training/run-engines';
import { runTrainingLoop } from '../../../shared/training/training-loop';
import type {
  CheckpointUploadAnswer, CheckpointUploadTarget, EngineInfo, ProgressCallback, TrainerApi, TrainerSettings, TrainingOutcome, TrainingSet,
} from './trainer-api';
import type { ProbeRequest, ProbeResult } from './trainer-api';
import { runProbe } from './trainer-probe';

/** What the worker entry knows about the compute it set up (backend name, SIMD, threads). */
export interface BackendReport { backend: string; simd: boolean; threads: number }

const YIELD_EVERY_MS = 25;
/** One progress message a second keeps the page's main thread nearly idle. */
const PROGRESS_EVERY_MS = 1000;

/**
 * Comlink sends a thrown Error as plain `{ name, message }`; the name carries the code from
 * shared/model/trainer-errors.ts so the page can branch on it (`fromBoundaryError` in trainer-client.ts).
 */
function boundaryError(error: unknown): Error {
  const shape = toTrainerError(error);
  const e = new Error(shape.message);
  e.name = shape.code;
  return e;
}

export class TrainerSession implements TrainerApi {
  private engine: RunEngine | null = null;
  private settings: TrainerSettings | null = null;
  private running = false;
  private stopRequested = false;
  private pauseGate: { promise: Promise<void>; release: () => void } | null = null;

  /** `backend` sets up (or reports) the TF.js backend; the worker passes its WASM/CPU set-up here. */
  constructor(private readonly backend: () => Promise<BackendReport>) {}

  async init(settings: TrainerSettings, trainingSet: TrainingSet, checkpoint?: Uint8Array): Promise<EngineInfo> {
    try {
      if (this.engine) throw new TrainerError(TrainerErrorCode.WrongState, 'This worker already holds a run; start a new worker for another run.');
      validateSettings(settings);
      const report = await this.backend();
      const ck = checkpoint ? decodeCheckpoint(checkpoint) : null;
      this.engine = createEngine(settings, trainingSet, ck);
      this.settings = settings;
      return { ...report, parameterCount: this.engine.parameterCount, step: this.engine.stepCount };
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async start(onProgress: ProgressCallback): Promise<TrainingOutcome> {
    const engine = this.engine;
    const s = this.settings;
    if (!engine || !s) throw boundaryError(new TrainerError(TrainerErrorCode.WrongState, 'Call init before start.'));
    if (this.running) throw boundaryError(new TrainerError(TrainerErrorCode.WrongState, 'This run is training already.'));
    this.running = true;
    this.stopRequested = false;
    try {
      // The page's scheduler saves checkpoints (through `uploadCheckpoint`), so the loop gets no checkpoint sink.
      // The last progress message is awaited so the page has it before `start` resolves (comlink callbacks travel
      // on their own port).
      const outcome = await runTrainingLoop(engine, s, {
        progressEveryMs: PROGRESS_EVERY_MS,
        yieldEveryMs: YIELD_EVERY_MS,
        onProgress,
        poll: () => (this.stopRequested ? 'stop' : this.pauseGate ? 'pause' : 'continue'),
        waitWhilePaused: async () => { await this.pauseGate?.promise; },
      });
      return outcome.kind === 'paused' ? { kind: 'stopped', step: outcome.step } : outcome;
    } finally {
      this.running = false;
    }
  }

  async pause(): Promise<void> {
    if (this.pauseGate) return;
    let release = () => {};
    const promise = new Promise<void>((resolve) => { release = resolve; });
    this.pauseGate = { promise, release };
  }

  async resume(): Promise<void> {
    const gate = this.pauseGate;
    this.pauseGate = null;
    gate?.release();
  }

  async stop(): Promise<void> {
    this.stopRequested = true;
    await this.resume();
  }

  async checkpoint(): Promise<Uint8Array> {
    try {
      if (!this.engine) throw new TrainerError(TrainerErrorCode.WrongState, 'Call init before asking for a checkpoint.');
      const bytes = encodeCheckpoint(this.engine.checkpoint());
      return transfer(bytes, [bytes.buffer as ArrayBuffer]);
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async uploadCheckpoint(target: CheckpointUploadTarget): Promise<CheckpointUploadAnswer> {
    try {
      if (!this.engine) throw new TrainerError(TrainerErrorCode.WrongState, 'Call init before saving a checkpoint.');
      const bytes = encodeCheckpoint(this.engine.checkpoint());
      const headers: Record<string, string> = { 'Content-Type': 'application/octet-stream' };
      if (target.token) headers['Authorization'] = `Bearer ${target.token}`;
      let response: Response;
      try {
        response = await fetch(target.url, { method: 'POST', headers, body: bytes as BodyInit });
      } catch (e) {
        throw new TrainerError(TrainerErrorCode.UploadFailed,
          `The checkpoint could not reach the server (${(e as Error).message || 'network error'}); check the connection, then save again.`);
      }
      const answer = await response.json().catch(() => null) as (Partial<CheckpointUploadAnswer> & { error?: { message?: unknown } }) | null;
      if (!response.ok) {
        const message = answer?.error?.message;
        const said = typeof message === 'string' ? message : null;
        throw new TrainerError(TrainerErrorCode.UploadFailed,
          said ? `The server did not store the checkpoint: ${said}` : `The server did not store the checkpoint (HTTP ${response.status}).`);
      }
      if (!answer || typeof (answer as CheckpointUploadAnswer).id !== 'string') {
        throw new TrainerError(TrainerErrorCode.UploadFailed, 'The server stored the checkpoint but its answer could not be read; reload the checkpoint list.');
      }
      return answer as CheckpointUploadAnswer;
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async samples(n: number): Promise<string[]> {
    try {
      if (!this.engine) throw new TrainerError(TrainerErrorCode.WrongState, 'Call init before asking for samples.');
      if (!Number.isInteger(n) || n < 1 || n > 1000) throw new TrainerError(TrainerErrorCode.BadSettings, `Ask for 1 to 1000 samples (got ${n}).`);
      return this.engine.samples(n);
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async probe(request: ProbeRequest): Promise<ProbeResult> {
    try {
      if (this.running) throw new TrainerError(TrainerErrorCode.WrongState, 'This worker is training; probe in a worker of its own.');
      validateSettings(request?.settings);
      const report = await this.backend();
      return runProbe(request, report.backend);
    } catch (e) {
      throw boundaryError(e);
    }
  }

  async dispose(): Promise<void> {
    this.stopRequested = true;
    await this.resume();
    this.engine?.dispose();
    this.engine = null;
  }
}

function validateSettings(s: TrainerSettings): void {
  const bad = (m: string) => new TrainerError(TrainerErrorCode.BadSettings, m);
  if (!s || typeof s !== 'object') throw bad('The run settings are missing.');
  if (!['ssm', 'gru', 'ngram'].includes(s.family)) throw bad(`Unknown model family "${String(s.family)}"; choose ssm, gru or ngram.`);
  const whole = (name: keyof TrainerSettings, min: number) => {
    const v = s[name];
    if (typeof v !== 'number' || !Number.isInteger(v) || v < min) throw bad(`Setting "${name}" must be a whole number ≥ ${min}; got ${JSON.stringify(v)}.`);
  };
  whole('steps', 0); whole('batchSize', 1); whole('samples', 1); whole('stateSize', 1); whole('warmupSteps', 0); whole('evalEvery', 0);
  if (!(s.learningRate > 0) || !Number.isFinite(s.learningRate)) throw bad(`The learning rate must be a positive number; got ${s.learningRate}.`);
  if (!(s.clipNorm >= 0)) throw bad(`The clipping norm must be 0 (off) or positive; got ${s.clipNorm}.`);
}
