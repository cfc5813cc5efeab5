/** Typed errors that carry their HTTP status; the error middleware turns them into `{ error: {...} }`. */
import type { ZodError } from 'zod';
import { ErrorCode, type FieldErrors } from '../shared/api/errors';

export class HttpError extends Error {
  override name = 'HttpError';
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly fields?: FieldErrors,
  ) {
    super(message);
  }
}

export const notSignedIn = (message = 'Sign in to continue.') => new HttpError(401, ErrorCode.NotSignedIn, message);

export const roleTooLow = (message: string) => new HttpError(403, ErrorCode.RoleTooLow, message);

export const notFound = (what = 'This item') =>
  new HttpError(404, ErrorCode.NotFound, `${what} was not found, or you do not have access to it.`);

export const conflict = (code: ErrorCode, message: string) => new HttpError(409, code, message);

export const gone = (code: ErrorCode, message: string) => new HttpError(410, code, message);

/** A 422 with one message per field. */
export function validationFailed(fields: FieldErrors, message?: string): HttpError {
  const names = Object.keys(fields);
  const summary =
    message ??
    (names.length === 1 && names[0] !== ''
      ? `Check the field "${names[0]}": ${fields[names[0]!]}`
      : 'Some fields need attention: see the message beside each field.');
  return new HttpError(422, ErrorCode.ValidationFailed, summary, fields);
}

/** Turns zod issues into per-field messages (the first message per field wins; `_` for the body as a whole). */
export function fromZodError(error: ZodError): HttpError {
  const fields: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.length > 0 ? issue.path.map(String).join('.') : '_';
    if (!(key in fields)) {
      fields[key] = key === '_' && issue.code === 'invalid_type' ? 'Send a JSON object as the request body.' : issue.message;
    }
  }
  const only = Object.keys(fields);
  if (only.length === 1 && only[0] === '_') return validationFailed(fields, fields['_']);
  return validationFailed(fields);
}
