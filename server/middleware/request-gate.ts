/**
 * At most `limit` API requests are worked on at once; the others wait here (costing nothing) in arrival
 * order. With every request's database and JSON steps interleaved on one event loop, 50 requests in flight
 * put a cheap request such as `GET /api/health` behind all of their steps; a short line keeps it quick.
 * Requests for which `bypass(req)` holds (health, config, file uploads: see app.ts) never wait. A response that turns into an event
 * stream (Content-Type text/event-stream) gives its place back as soon as its headers go out: it stays open
 * for as long as a page watches and must not hold a place in the line meanwhile. No path list is needed for
 * that; whatever route streams is recognised by its answer.
 */
import type { Request, RequestHandler, Response } from 'express';

function isEventStream(res: Response): boolean {
  return String(res.getHeader('content-type') ?? '').toLowerCase().startsWith('text/event-stream');
}

/** Calls `onStream` once, when the response's headers are written with an event-stream Content-Type. */
function whenStreaming(res: Response, onStream: () => void): void {
  const writeHead = res.writeHead;
  res.writeHead = function (this: Response, ...args: Parameters<Response['writeHead']>) {
    const out = writeHead.apply(this, args);
    const headers = (args as unknown[]).find((a) => typeof a === 'object' && a !== null && !Array.isArray(a)) as Record<string, unknown> | undefined;
    const given = headers ? Object.entries(headers).find(([k]) => k.toLowerCase() === 'content-type')?.[1] : undefined;
    if (isEventStream(this) || String(given ?? '').toLowerCase().startsWith('text/event-stream')) onStream();
    return out;
  } as Response['writeHead'];
}

export function requestGate(limit: number, bypass: (req: Request) => boolean): RequestHandler {
  let active = 0;
  const waiting: (() => void)[] = [];
  const release = () => {
    const next = waiting.shift();
    if (next) next();
    else active--;
  };
  return (req, res, next) => {
    if (bypass(req)) return next();
    let released = false;
    const done = () => {
      if (released) return;
      released = true;
      release();
    };
    const go = () => {
      res.once('finish', done);
      res.once('close', done);
      whenStreaming(res, done);
      next();
    };
    if (active < limit) {
      active++;
      go();
    } else {
      waiting.push(() => {
        // The client left while waiting: hand the slot on at once.
        if (res.destroyed || req.destroyed) {
          released = true;
          release();
          return;
        }
        go();
      });
    }
  };
}
