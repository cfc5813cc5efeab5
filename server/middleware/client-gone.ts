/**
 * A request whose client closed the connection before the answer: work queued for it (the CPU pool's queue)
 * is dropped, and long writes (a corpus upload's words) check its signal and roll back. Nobody reads the
 * answer; the status is the common "client closed request" one, so logs tell it from a fault.
 */
import { AsyncLocalStorage } from 'node:async_hooks';
import type { RequestHandler } from 'express';
import { ErrorCode } from '../../shared/api/errors';
import { HttpError } from '../http-error';

/** Work dropped because its client closed the connection before the answer. */
export class ClientGoneError extends HttpError {
  override name = 'ClientGoneError';
  constructor() {
    super(499, ErrorCode.ServerBusy, 'The connection closed before the answer; nothing was saved. Send the request again.');
  }
}

/** The signal of the request being served: it aborts when its client goes away before the answer. */
const requestSignal = new AsyncLocalStorage<AbortSignal>();

/** The signal of the current request, if any. */
export function currentRequestSignal(): AbortSignal | undefined {
  return requestSignal.getStore();
}

/** Express middleware: the request's signal aborts if the connection closes before the answer. */
export const cancelWorkOnClose: RequestHandler = (req, res, next) => {
  const controller = new AbortController();
  res.once('close', () => {
    if (!res.writableFinished) controller.abort();
  });
  requestSignal.run(controller.signal, next);
};
