/**
 * Logs: pino, one JSON line per event. Request lines come from pino-http with a request id (taken from a
 * well-formed `X-Request-Id` or made up, and sent back in that header). Nothing that identifies or
 * authenticates a person is written: no SQL text with values (statements are bound, and the driver's
 * message is cut to SQLite's own reason), no e-mail addresses, no password hashes, no tokens, no headers,
 * no query strings (they hold search text). `safeError` is the only way an error reaches a log.
 */
import type { Request, RequestHandler } from 'express';
import { randomUUID } from 'node:crypto';
import type { IncomingMessage, ServerResponse } from 'node:http';
import { pino, type DestinationStream, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';

export type { Logger };

export const LOG_LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const;
export type LogLevel = (typeof LOG_LEVELS)[number];

const EMAIL = /[^\s@'"`<>(),;:]+@[^\s@'"`<>(),;:]+\.[^\s@'"`<>(),;:]+/g;
const BCRYPT_HASH = /\$2[abxy]?\$\d{2}\$[./A-Za-z0-9]{53}/g;
const BCRYPT_PREFIX = /\$2[abxy]?\$\d{2}\$[./A-Za-z0-9]*/g;
const JWT = /\beyJ[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+/g;
const LONG_HEX = /\b[0-9a-f]{40,}\b/gi;
const SQL_START = /^\s*(select|insert|update|delete|with|pragma|create|drop|alter|replace|begin|commit|rollback|savepoint|release)\b/i;

/** Removes e-mail addresses, password hashes, tokens and any SQL statement text from a message. */
export function scrubText(text: string): string {
  let out = text;
  // Driver messages read "<statement> - <reason>": keep only the reason.
  if (SQL_START.test(out)) {
    const cut = out.lastIndexOf(' - ');
    out = cut >= 0 ? `[statement not logged] - ${out.slice(cut + 3)}` : '[statement not logged]';
  }
  return out
    .replace(BCRYPT_HASH, '[hash]')
    .replace(BCRYPT_PREFIX, '[hash]')
    .replace(JWT, '[token]')
    .replace(LONG_HEX, '[hex]')
    .replace(EMAIL, '[e-mail]');
}

export interface SafeError {
  type: string;
  code?: string;
  message: string;
  stack?: string;
}

/** What of an error may be logged: its class, its code and a scrubbed message and stack (no fields, no SQL, no params). */
export function safeError(error: unknown): SafeError {
  const e = error as { name?: unknown; message?: unknown; stack?: unknown; code?: unknown; constructor?: { name?: string } } | null;
  if (typeof e !== 'object' || e === null || typeof e.message !== 'string') {
    return { type: typeof error, message: scrubText(String(error)).slice(0, 500) };
  }
  const code = e.code;
  const stackLines = (typeof e.stack === 'string' ? e.stack : '').split('\n').filter((l) => /^\s+at /.test(l)).slice(0, 8);
  return {
    type: (typeof e.name === 'string' && e.name) || e.constructor?.name || 'Error',
    ...(typeof code === 'string' ? { code } : {}),
    message: scrubText(e.message).slice(0, 500),
    ...(stackLines.length > 0 ? { stack: stackLines.join('\n') } : {}),
  };
}

export function createLogger(level: LogLevel, destination?: DestinationStream): Logger {
  return pino({ level, base: undefined, timestamp: pino.stdTimeFunctions.isoTime }, destination);
}

/** Responses of routine requests (marked by `routineRequests`): logged at `debug` when they succeed. */
const routine = new WeakSet<object>();

/**
 * Marks the requests of a router as routine: a runner's calls (heartbeat and claim every few seconds,
 * progress, metrics) would bury the log at `info`. The router says so itself, so the level does not depend on
 * the path a request line shows (a router sees its path without its mount prefix).
 */
export const routineRequests: RequestHandler = (_req, res, next) => {
  routine.add(res);
  next();
};

/** The level of a request line: faults `error`, a routine request that succeeds `debug`, else `info`. */
export function requestLogLevel(isRoutine: boolean, status: number, err?: unknown): 'error' | 'info' | 'debug' {
  if (err || status >= 500) return 'error';
  return status < 400 && isRoutine ? 'debug' : 'info';
}

const REQUEST_ID = /^[A-Za-z0-9._-]{1,64}$/;

/** pino-http with a request id, the path without its query string, and nothing else of the request. */
export function requestLogger(logger: Logger): RequestHandler {
  const middleware = pinoHttp({
    logger,
    genReqId: (req: IncomingMessage, res: ServerResponse) => {
      const given = req.headers['x-request-id'];
      const id = typeof given === 'string' && REQUEST_ID.test(given) ? given : randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    serializers: {
      req: (req: { id: unknown; method: string; url: string }) => ({ id: req.id, method: req.method, path: scrubText(String(req.url).split('?')[0] ?? '') }),
      res: (res: { statusCode: number }) => ({ status: res.statusCode }),
      err: (err: unknown) => safeError(err),
    },
    wrapSerializers: false,
    customLogLevel: (_req, res, err) => requestLogLevel(routine.has(res), res.statusCode, err),
    autoLogging: { ignore: (req) => !(req.url ?? '').startsWith('/api/') },
  });
  return middleware as unknown as RequestHandler;
}

/** The request's child logger (with its id) when pino-http ran, else the given one. */
export function loggerOf(req: Request | undefined, fallback: Logger): Logger {
  const log = (req as (Request & { log?: Logger }) | undefined)?.log;
  return log ?? fallback;
}
