/**
 * At most `limit` API requests are worked on at once; the others wait here (costing nothing) in arrival
 * order. With every request's database and JSON steps interleaved on one event loop, 50 requests in flight
 * put a cheap request such as `GET /api/health` behind all of their steps; a short line keeps it quick.
 * Requests for which `bypass(req)` holds (health, config, file uploads: see app.ts) never wait. A handler whose
 * answer stays open (an event stream, for as long as a page watches) calls `leaveRequestLine(res)` once it
 * starts streaming: it must not hold a place in the line meanwhile.
 */
import type { Request, RequestHandler, Response } from 'express';

/** How to give back the place of a response that holds one. */
const places = new WeakMap<Response, () => void>();

/** Gives the response's place in the line back now (it stays open long; it costs nothing while it waits). */
export function leaveRequestLine(res: Response): void {
  places.get(res)?.();
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
      places.set(res, done);
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
