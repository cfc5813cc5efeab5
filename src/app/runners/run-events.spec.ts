import { Coalescer, EventStreamParser, openEventStream, type StreamEvent, type StreamFetch, type StreamResponse, type StreamState } from './run-events';

/** A fake server: each fetch gets the next scripted answer; `open` answers expose a stream the test writes to. */
function fakeServer(answers: ('open' | number | 'network')[]) {
  const calls: { url: string; headers: Record<string, string> }[] = [];
  const streams: ReadableStreamDefaultController<Uint8Array>[] = [];
  const encoder = new TextEncoder();
  const fetch: StreamFetch = async (url, init) => {
    calls.push({ url, headers: init.headers });
    const answer = answers.shift() ?? 'network';
    if (answer === 'network') throw new TypeError('Failed to fetch');
    if (answer !== 'open') return { ok: false, status: answer, body: null } satisfies StreamResponse;
    let controller!: ReadableStreamDefaultController<Uint8Array>;
    const body = new ReadableStream<Uint8Array>({ start: (c) => { controller = c; } });
    init.signal.addEventListener('abort', () => { try { controller.error(new DOMException('aborted', 'AbortError')); } catch { /* closed */ } });
    streams.push(controller);
    return { ok: true, status: 200, body };
  };
  return {
    fetch, calls, streams,
    write: (i: number, text: string) => streams[i]!.enqueue(encoder.encode(text)),
    end: (i: number) => streams[i]!.close(),
  };
}

/** Lets pending promise callbacks (reads of the fake stream) run. */
const settle = async () => { for (let i = 0; i < 10; i++) await Promise.resolve(); };

describe('EventStreamParser', () => {
  // Expected events follow the worked examples of WHATWG HTML section 9.2.6 (multi-line data joined by LF,
  // comment lines ignored, one leading space after the colon removed, a block without data not dispatched).
  it('splits chunks into events whatever the chunk boundaries and line ends', () => {
    const parser = new EventStreamParser();
    const events: StreamEvent[] = [];
    const text = ': keep-alive\r\nevent: progress\r\ndata: {"step":1}\r\n\r\ndata: first\ndata:second\n\nevent: run\rdata: x\r\revent: empty\n\n';
    // Feed it one character at a time: CR LF split over two chunks must count as one line end.
    for (const ch of text) events.push(...parser.push(ch));
    expect(events).toEqual([
      { event: 'progress', data: '{"step":1}', id: null },
      { event: 'message', data: 'first\nsecond', id: null },
      { event: 'run', data: 'x', id: null },
    ]);
  });

  it('keeps the last id and holds back an unfinished event', () => {
    const parser = new EventStreamParser();
    expect(parser.push('id: 7\nevent: metrics\ndata: {"points":[]}')).toEqual([]);
    expect(parser.push('\n\n')).toEqual([{ event: 'metrics', data: '{"points":[]}', id: '7' }]);
  });
});

describe('openEventStream', () => {
  afterEach(() => vi.useRealTimers());

  it('sends the bearer token and hands over the events of the stream', async () => {
    const server = fakeServer(['open']);
    const events: StreamEvent[] = [];
    const states: StreamState[] = [];
    const handle = openEventStream({ url: '/api/x/events', token: () => 'tok-1', fetch: server.fetch, onEvent: (e) => events.push(e), onState: (s) => states.push(s) });
    await settle();
    server.write(0, 'event: run\ndata: {"id":"r1"}\n\n: keep-alive\n\nevent: progress\ndata: {"step":');
    server.write(0, '5}\n\n');
    await settle();
    expect(server.calls[0]).toEqual({ url: '/api/x/events', headers: { Accept: 'text/event-stream', Authorization: 'Bearer tok-1' } });
    expect(events.map((e) => [e.event, JSON.parse(e.data)])).toEqual([['run', { id: 'r1' }], ['progress', { step: 5 }]]);
    expect(states).toEqual(['open']);
    handle.close();
    expect(handle.state).toBe('closed');
  });

  it('reconnects after the stream ends, and tells the caller it reopened', async () => {
    vi.useFakeTimers();
    const server = fakeServer(['open', 'open']);
    const reopened = vi.fn();
    const events: string[] = [];
    const handle = openEventStream({ url: '/e', token: () => 't', fetch: server.fetch, onEvent: (e) => events.push(e.data), onReopen: reopened,
      retryDelaysMs: [1000] });
    await settle();
    server.write(0, 'data: a\n\n');
    server.end(0);
    await settle();
    expect(server.calls).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(999);
    expect(server.calls).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(1);
    await settle();
    expect(server.calls).toHaveLength(2);
    expect(reopened).toHaveBeenCalledTimes(1);
    server.write(1, 'data: b\n\n');
    await settle();
    expect(events).toEqual(['a', 'b']);
    handle.close();
  });

  it('polls while the stream cannot be opened, and stops polling once it opens', async () => {
    vi.useFakeTimers();
    const server = fakeServer([503, 'network', 'open']);
    const poll = vi.fn();
    const states: StreamState[] = [];
    const handle = openEventStream({ url: '/e', token: () => 't', fetch: server.fetch, onEvent: () => undefined, onState: (s) => states.push(s),
      poll, pollEveryMs: 5000, failuresBeforePolling: 2, retryDelaysMs: [1000, 20_000] });
    await settle();
    expect(poll).not.toHaveBeenCalled(); // one failure: retry first
    await vi.advanceTimersByTimeAsync(1000); // second attempt fails: polling starts at once
    await settle();
    expect(poll).toHaveBeenCalledTimes(1);
    expect(handle.state).toBe('polling');
    await vi.advanceTimersByTimeAsync(10_000);
    expect(poll).toHaveBeenCalledTimes(3);
    await vi.advanceTimersByTimeAsync(10_000); // third attempt (20 s after the second) opens the stream
    await settle();
    expect(server.calls).toHaveLength(3);
    expect(handle.state).toBe('open');
    const polled = poll.mock.calls.length;
    await vi.advanceTimersByTimeAsync(20_000);
    expect(poll).toHaveBeenCalledTimes(polled);
    expect(states).toEqual(['polling', 'open']);
    handle.close();
  });

  it('gives up on 401 (signed out) without retrying', async () => {
    vi.useFakeTimers();
    const server = fakeServer([401, 'open']);
    const handle = openEventStream({ url: '/e', token: () => 't', fetch: server.fetch, onEvent: () => undefined, poll: vi.fn() });
    await settle();
    await vi.advanceTimersByTimeAsync(60_000);
    expect(server.calls).toHaveLength(1);
    expect(handle.state).toBe('closed');
  });

  it('stops reading and retrying after close()', async () => {
    vi.useFakeTimers();
    const server = fakeServer(['open', 'open']);
    const events: string[] = [];
    const handle = openEventStream({ url: '/e', token: () => 't', fetch: server.fetch, onEvent: (e) => events.push(e.data) });
    await settle();
    handle.close();
    await vi.advanceTimersByTimeAsync(60_000);
    expect(server.calls).toHaveLength(1);
    expect(events).toEqual([]);
  });
});

describe('Coalescer', () => {
  afterEach(() => vi.useRealTimers());

  it('hands over at most one batch per interval, keeping every value in order', async () => {
    vi.useFakeTimers();
    const batches: number[][] = [];
    const c = new Coalescer<number>((v) => batches.push(v), 1000);
    c.add(1);
    await vi.advanceTimersByTimeAsync(0);
    expect(batches).toEqual([[1]]);
    for (let i = 2; i <= 50; i++) { c.add(i); await vi.advanceTimersByTimeAsync(15); }
    // 49 values over 735 ms after the first batch: held back until one interval after it.
    expect(batches).toHaveLength(1);
    await vi.advanceTimersByTimeAsync(300);
    expect(batches).toHaveLength(2);
    expect(batches[1]).toEqual(Array.from({ length: 49 }, (_, i) => i + 2));
    c.dispose();
  });
});
