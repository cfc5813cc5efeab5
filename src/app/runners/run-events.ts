/**
 * A small client for the server-sent event streams of shared/api/runners.ts, read with `fetch` and a stream
 * reader (EventSource cannot send the `Authorization: Bearer` header). It reconnects after a dropped stream with a
 * growing delay, and after a few failed attempts in a row it calls a polling function every few seconds until a
 * stream opens again. Framework-free: the Angular side (live-events.ts) passes the token, the fetch and the
 * callbacks in, and the specs drive it with fake fetch streams.
 */

/** One dispatched event (WHATWG HTML, "Server-sent events", section 9.2.6 "Interpreting an event stream"). */
export interface StreamEvent { event: string; data: string; id: string | null }

/**
 * Turns text chunks into events. Lines end with CRLF, LF or CR; `:` starts a comment (keep-alives); a blank line
 * dispatches the collected `data` lines (joined by LF) under the last `event` name (default `message`).
 */
export class EventStreamParser {
  private buffer = '';
  private data: string[] = [];
  private event = '';
  private lastId: string | null = null;
  /** A chunk that ended on CR: a LF at the start of the next chunk belongs to the same line end. */
  private pendingCr = false;

  push(chunk: string): StreamEvent[] {
    let text = chunk;
    if (this.pendingCr && text.startsWith('\n')) text = text.slice(1);
    this.pendingCr = text.endsWith('\r');
    this.buffer += text;
    const out: StreamEvent[] = [];
    const lines = this.buffer.split(/\r\n|\n|\r/);
    this.buffer = lines.pop() ?? '';
    for (const line of lines) {
      if (line === '') {
        if (this.data.length > 0) out.push({ event: this.event || 'message', data: this.data.join('\n'), id: this.lastId });
        this.data = [];
        this.event = '';
        continue;
      }
      if (line.startsWith(':')) continue;
      const colon = line.indexOf(':');
      const field = colon < 0 ? line : line.slice(0, colon);
      let value = colon < 0 ? '' : line.slice(colon + 1);
      if (value.startsWith(' ')) value = value.slice(1);
      if (field === 'data') this.data.push(value);
      else if (field === 'event') this.event = value;
      else if (field === 'id' && !value.includes('\0')) this.lastId = value;
    }
    return out;
  }
}

export type StreamState = 'connecting' | 'open' | 'polling' | 'closed';

/** What a failed stream request means for the next attempt. */
export class StreamRefused extends Error {
  constructor(readonly status: number) {
    super(`The event stream answered ${status}.`);
    this.name = 'StreamRefused';
  }
}

/** The part of a fetch answer the client reads (a real `Response` fits). */
export interface StreamResponse { ok: boolean; status: number; body: ReadableStream<Uint8Array> | null }
export type StreamFetch = (url: string, init: { headers: Record<string, string>; signal: AbortSignal; cache: 'no-store' }) => Promise<StreamResponse>;

export interface EventStreamOptions {
  url: string;
  /** The sign-in token; read at every (re)connect. `null` closes the stream (signed out). */
  token: () => string | null;
  fetch: StreamFetch;
  onEvent: (event: StreamEvent) => void;
  onState?: (state: StreamState) => void;
  /** Called when a stream opens again after a drop (the caller may reload what it missed). */
  onReopen?: () => void;
  /** The fallback: called every `pollEveryMs` while no stream is open after `failuresBeforePolling` attempts. */
  poll?: () => Promise<void> | void;
  pollEveryMs?: number;
  failuresBeforePolling?: number;
  /** Delays before the 1st, 2nd, … reconnect attempt; the last one repeats. */
  retryDelaysMs?: readonly number[];
}

export interface EventStreamHandle { close(): void; readonly state: StreamState }

const DEFAULT_RETRY_MS = [1000, 2000, 5000, 10_000, 30_000] as const;

/** Opens the stream at once; `close()` ends it, its timers and its polling. */
export function openEventStream(options: EventStreamOptions): EventStreamHandle {
  const retries = options.retryDelaysMs ?? DEFAULT_RETRY_MS;
  const pollEvery = options.pollEveryMs ?? 5000;
  const failuresBeforePolling = options.failuresBeforePolling ?? 2;
  let state: StreamState = 'connecting';
  let closed = false;
  let failures = 0;
  let everOpened = false;
  let abort: AbortController | null = null;
  let retryTimer: ReturnType<typeof setTimeout> | null = null;
  let pollTimer: ReturnType<typeof setInterval> | null = null;

  const setState = (next: StreamState) => {
    if (state === next) return;
    state = next;
    options.onState?.(next);
  };
  const stopPolling = () => {
    if (pollTimer !== null) clearInterval(pollTimer);
    pollTimer = null;
  };
  const startPolling = () => {
    if (pollTimer !== null || !options.poll) return;
    setState('polling');
    const tick = () => { void Promise.resolve().then(() => options.poll?.()).catch(() => undefined); };
    tick();
    pollTimer = setInterval(tick, pollEvery);
  };

  const scheduleRetry = () => {
    if (closed) return;
    failures += 1;
    if (failures >= failuresBeforePolling) startPolling();
    else setState('connecting');
    const delay = retries[Math.min(failures - 1, retries.length - 1)] ?? 30_000;
    retryTimer = setTimeout(() => { retryTimer = null; void connect(); }, delay);
  };

  const connect = async (): Promise<void> => {
    if (closed) return;
    const token = options.token();
    if (token === null) { handle.close(); return; }
    abort = new AbortController();
    if (pollTimer === null) setState('connecting');
    try {
      const response = await options.fetch(options.url, {
        headers: { Accept: 'text/event-stream', Authorization: `Bearer ${token}` }, signal: abort.signal, cache: 'no-store',
      });
      if (!response.ok || !response.body) throw new StreamRefused(response.status);
      stopPolling();
      failures = 0;
      setState('open');
      if (everOpened) options.onReopen?.();
      everOpened = true;
      const reader = response.body.getReader();
      const decoder = new TextDecoder();
      const parser = new EventStreamParser();
      for (;;) {
        const { done, value } = await reader.read();
        if (done || closed) break;
        for (const event of parser.push(decoder.decode(value, { stream: true }))) {
          if (closed) break;
          options.onEvent(event);
        }
      }
    } catch (error) {
      if (closed) return;
      // Signed out or no longer a member: a new attempt would be refused the same way. Polling may still answer
      // (e.g. a server without the stream route), so it takes over instead.
      if (error instanceof StreamRefused && (error.status === 401 || error.status === 403)) { handle.close(); return; }
    }
    if (!closed) scheduleRetry();
  };

  const handle: EventStreamHandle = {
    close() {
      if (closed) return;
      closed = true;
      abort?.abort();
      if (retryTimer !== null) clearTimeout(retryTimer);
      stopPolling();
      setState('closed');
    },
    get state() { return state; },
  };
  void connect();
  return handle;
}

/**
 * Collects values and hands them over at most once per `everyMs` (the first at once, later ones at the end of the
 * interval), so a busy stream costs the page one render per interval however many events arrive.
 */
export class Coalescer<T> {
  private pending: T[] = [];
  private timer: ReturnType<typeof setTimeout> | null = null;
  private last = Number.NEGATIVE_INFINITY;

  constructor(private readonly flush: (values: T[]) => void, private readonly everyMs = 1000) {}

  add(value: T): void {
    this.pending.push(value);
    if (this.timer !== null) return;
    const wait = Math.max(0, this.last + this.everyMs - Date.now());
    this.timer = setTimeout(() => this.emit(), wait);
  }

  dispose(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.pending = [];
  }

  private emit(): void {
    this.timer = null;
    this.last = Date.now();
    const values = this.pending;
    this.pending = [];
    if (values.length > 0) this.flush(values);
  }
}
