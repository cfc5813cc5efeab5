/** The one error middleware (mounted last) and the JSON 404 for unknown API paths. */
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import type { ErrorRequestHandler, Request, RequestHandler } from 'express';
import { ErrorCode, type ApiErrorBody } from '../../shared/api/errors';
import { HttpError } from '../http-error';

function bodyParserError(err: unknown): HttpError | null {
  if (typeof err !== 'object' || err === null || !('type' in err)) return null;
  const type = (err as { type: unknown }).type;
  switch (type) {
    case 'entity.parse.failed':
      return new HttpError(400, ErrorCode.MalformedRequest, 'The request body is not valid JSON: check quotes, commas and brackets.');
    case 'entity.too.large':
      return new HttpError(413, ErrorCode.PayloadTooLarge, 'The request body is too large: send less data in one request.');
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new HttpError(400, ErrorCode.MalformedRequest, 'Send the request body as UTF-8 JSON.');
    case 'request.aborted':
      return new HttpError(400, ErrorCode.MalformedRequest, 'The request was cut off before its body arrived: try again.');
    default:
      return null;
  }
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, ErrorCode.NotFound, `There is no API endpoint ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

export function errorHandler(logError: (error: unknown, req?: Request) => void): ErrorRequestHandler {
  return (err, req, res, next) => {
    if (res.headersSent) {
      next(err);
      return;
    }
    const known =
      err instanceof HttpError
        ? err
        : err instanceof UniqueConstraintViolationException
          ? new HttpError(409, ErrorCode.Conflict, 'Someone made the same change at the same moment. Reload the page and try again.')
          : bodyParserError(err);
    const error = known ?? new HttpError(500, ErrorCode.Internal, 'Something went wrong on the server. Try again; if it keeps happening, tell your admin.');
    if (!known) logError(err, req);
    const retryAfter = (error as { retryAfterSeconds?: unknown }).retryAfterSeconds;
    if (typeof retryAfter === 'number') res.set('Retry-After', String(retryAfter));
    const body: ApiErrorBody = { error: { code: error.code, message: error.message } };
    if (error.fields) body.error.fields = error.fields;
    res.status(error.status).json(body);
  };
}
