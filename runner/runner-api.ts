/**
 * The runner's only way to the server: the `/api/runner/*` routes (shared/api/runner-jobs.ts) with a runner
 * token. Node's global `fetch`; every failed answer becomes a `RunnerApiError` carrying the server's code and
 * sentence (and `retryAfterSeconds` of a 409 RUN_HELD).
 */
import type { CheckpointDto, TrainingSet } from '../shared/api/runs';
import type { CurvePoint as MetricPoint } from '../shared/training/metric-points';
import type {
  EvaluationStage, RunnerEvaluationEndRequest, RunnerEvaluationJob, RunnerEvaluationResultAnswer, RunnerEvaluationResultRequest,
} from '../shared/api/evaluation-jobs';
import type {
  RunnerFinishRequest, RunnerHeartbeatAnswer, RunnerHeartbeatRequest, RunnerJob, RunnerMetricsAnswer, RunnerProgressAnswer, RunnerProgressRequest,
} from '../shared/api/runner-jobs';

export class RunnerApiError extends Error {
  override readonly name = 'RunnerApiError';
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly retryAfterSeconds: number | null = null,
  ) {
    super(message);
  }
}

/** A claim that waits for work gets this much longer than its wait before the runner gives up on the answer. */
const CLAIM_WAIT_MARGIN_SECONDS = 15;

/** Latest checkpoint of a held run: its bytes and step. */
export interface CheckpointBytes { bytes: Uint8Array; step: number }

export class RunnerApi {
  private readonly base: string;

  constructor(serverUrl: string, private readonly token: string, private readonly timeoutMs = 30_000) {
    this.base = `${serverUrl.replace(/\/+$/, '')}/api/runner`;
  }

  /**
   * `null` when the server has nothing to do (204). With `waitSeconds` (no run id) the server holds the answer until
   * work may be there or the wait ends; this call's timeout then exceeds the wait. `signal` ends the call early
   * (the runner stops).
   */
  async claim(runId?: string, wait: { waitSeconds?: number; signal?: AbortSignal } = {}): Promise<RunnerJob | null> {
    const body = runId ? { runId } : wait.waitSeconds ? { waitSeconds: wait.waitSeconds } : {};
    const timeoutMs = Math.max(this.timeoutMs, ((wait.waitSeconds ?? 0) + CLAIM_WAIT_MARGIN_SECONDS) * 1000);
    const res = await this.send('POST', '/claim', body, [], { timeoutMs, signal: wait.signal });
    if (res.status === 204) return null;
    return (await res.json()) as RunnerJob;
  }

  async heartbeat(body: RunnerHeartbeatRequest): Promise<RunnerHeartbeatAnswer> {
    return (await (await this.send('POST', '/heartbeat', body)).json()) as RunnerHeartbeatAnswer;
  }

  async trainingSet(runId: string): Promise<TrainingSet> {
    return (await (await this.send('GET', `/jobs/${runId}/training-set`)).json()) as TrainingSet;
  }

  /** `null` when the run has no checkpoint yet (404). */
  async latestCheckpoint(runId: string): Promise<CheckpointBytes | null> {
    const res = await this.send('GET', `/jobs/${runId}/checkpoint`, undefined, [404]);
    if (res.status === 404) return null;
    const step = Number(res.headers.get('x-checkpoint-step') ?? Number.NaN);
    return { bytes: new Uint8Array(await res.arrayBuffer()), step };
  }

  async progress(runId: string, body: RunnerProgressRequest): Promise<RunnerProgressAnswer> {
    return (await (await this.send('POST', `/jobs/${runId}/progress`, body)).json()) as RunnerProgressAnswer;
  }

  async metrics(runId: string, points: MetricPoint[]): Promise<RunnerMetricsAnswer> {
    return (await (await this.send('POST', `/jobs/${runId}/metrics`, { points })).json()) as RunnerMetricsAnswer;
  }

  async uploadCheckpoint(runId: string, bytes: Uint8Array, reason: 'auto' | 'stop' | 'manual', boundBitsPerChar: number | null): Promise<CheckpointDto> {
    const q = new URLSearchParams({ reason });
    if (boundBitsPerChar !== null && Number.isFinite(boundBitsPerChar)) q.set('boundBitsPerChar', String(boundBitsPerChar));
    return (await (await this.send('POST', `/jobs/${runId}/checkpoints?${q}`, bytes)).json()) as CheckpointDto;
  }

  async finish(runId: string, body: RunnerFinishRequest): Promise<void> {
    await this.send('POST', `/jobs/${runId}/finish`, body);
  }

  /** An evaluation request to compute (`null` when none waits, 204). */
  async claimEvaluation(requestId?: string): Promise<RunnerEvaluationJob | null> {
    const res = await this.send('POST', '/evaluations/claim', requestId ? { requestId } : {});
    if (res.status === 204) return null;
    return (await res.json()) as RunnerEvaluationJob;
  }

  async evaluationCheckpoint(requestId: string): Promise<Uint8Array> {
    return new Uint8Array(await (await this.send('GET', `/evaluations/${requestId}/checkpoint`)).arrayBuffer());
  }

  async evaluationTrainingSet(requestId: string): Promise<TrainingSet> {
    return (await (await this.send('GET', `/evaluations/${requestId}/training-set`)).json()) as TrainingSet;
  }

  /** The newest checkpoint of the evaluation's GRU baseline run. */
  async evaluationBaseline(requestId: string): Promise<Uint8Array> {
    return new Uint8Array(await (await this.send('GET', `/evaluations/${requestId}/baseline-checkpoint`)).arrayBuffer());
  }

  async evaluationProgress(requestId: string, stage: EvaluationStage): Promise<void> {
    await this.send('POST', `/evaluations/${requestId}/progress`, stage);
  }

  async evaluationResult(requestId: string, body: RunnerEvaluationResultRequest): Promise<RunnerEvaluationResultAnswer> {
    return (await (await this.send('POST', `/evaluations/${requestId}/result`, body)).json()) as RunnerEvaluationResultAnswer;
  }

  async endEvaluation(requestId: string, body: RunnerEvaluationEndRequest): Promise<void> {
    await this.send('POST', `/evaluations/${requestId}/end`, body);
  }

  private async send(method: string, path: string, body?: unknown, allowed: number[] = [], call: { timeoutMs?: number; signal?: AbortSignal } = {}): Promise<Response> {
    const headers: Record<string, string> = { Authorization: `Bearer ${this.token}` };
    let payload: BodyInit | undefined;
    if (body instanceof Uint8Array) {
      headers['Content-Type'] = 'application/octet-stream';
      payload = body as BodyInit;
    } else if (body !== undefined) {
      headers['Content-Type'] = 'application/json';
      payload = JSON.stringify(body);
    }
    let res: Response;
    try {
      const timeout = AbortSignal.timeout(call.timeoutMs ?? this.timeoutMs);
      const signal = call.signal ? AbortSignal.any([timeout, call.signal]) : timeout;
      res = await fetch(`${this.base}${path}`, { method, headers, body: payload, signal });
    } catch (e) {
      throw new RunnerApiError(0, 'NETWORK', `The server at ${this.base} did not answer ${method} ${path} (${(e as Error).message}).`);
    }
    if (res.ok || allowed.includes(res.status)) return res;
    const answer = (await res.json().catch(() => null)) as { error?: { code?: string; message?: string; retryAfterSeconds?: number } } | null;
    const e = answer?.error;
    throw new RunnerApiError(res.status, e?.code ?? `HTTP_${res.status}`, e?.message ?? `${method} ${path} answered HTTP ${res.status}.`,
      typeof e?.retryAfterSeconds === 'number' ? e.retryAfterSeconds : null);
  }
}
