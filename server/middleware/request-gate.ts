/**
 * At most `limit` API requests are worked on at once; the others wait here (costing nothing) in arrival
 * order. With every request's database and JSON steps interleaved on one event loop, 50 requests in flight
 * put a cheap request such as `GET /api/health` behind all of their steps; a short line keeps it quick.
 * Health and config answers bypass the gate.
 */
import type { RequestHandler } from 'express';

export function requestGate(limit: number, bypass: (path: string) => boolean): RequestHandler {
  let active = 0;
  const waiting: (() => void)[] = [];
  const release = () => {
    const next = waiting.shift();
    if (next) next();
    else active--;
  };
  return (req, res, next) => {
    if (bypass(req.path)) return next();
    let released = false;
    const done = () => {
      if (released) return;
      released = true;
      release();
    };
    const go = () => {
      res.once('finish', done);
      res.once('close', done);
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
