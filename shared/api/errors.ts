/**
 * Error codes of the REST API. Every error response has the body
 * `{ error: { code, message, fields? } }` (see `ApiErrorBody`). The client may branch on `code`;
 * `message` is a sentence for people that says what to do.
 */
export const ErrorCode = {
  /** 400: the body is not valid JSON or the request is otherwise malformed. */
  MalformedRequest: 'MALFORMED_REQUEST',
  /** 401: no token, an expired token, or a token invalidated by sign-out / password change. */
  NotSignedIn: 'NOT_SIGNED_IN',
  /** 401: sign-in failed (one generic message for unknown e-mail and wrong password). */
  BadCredentials: 'BAD_CREDENTIALS',
  /** 403: signed in and allowed to see the thing, but the role is too low for this action. */
  RoleTooLow: 'ROLE_TOO_LOW',
  /** 403: the invitation was sent to another e-mail address than the signed-in account's. */
  InvitationEmailMismatch: 'INVITATION_EMAIL_MISMATCH',
  /** 404: not found, or the caller is not a member of the bench (existence is not revealed). */
  NotFound: 'NOT_FOUND',
  /** 409: an account with this e-mail address exists already. */
  EmailTaken: 'EMAIL_TAKEN',
  /** 409: the action would leave a bench without an owner. */
  LastOwner: 'LAST_OWNER',
  /** 409: the action would leave the instance without an admin. */
  LastAdmin: 'LAST_ADMIN',
  /** 409: the person is already a member of the bench. */
  AlreadyMember: 'ALREADY_MEMBER',
  /** 409: runs still use the corpus (or archived runs do and the request did not confirm it). */
  CorpusInUse: 'CORPUS_IN_USE',
  /** 422: an uploaded corpus file has errors; the body also carries `problems` (one per line). */
  CorpusInvalid: 'CORPUS_INVALID',
  /** 409: the run's status does not allow this (an illegal status change, or archiving/deleting a run in progress). */
  RunStatusConflict: 'RUN_STATUS_CONFLICT',
  /** 422: an uploaded checkpoint is damaged, of another format version, or does not fit the run. */
  CheckpointUnusable: 'CHECKPOINT_UNUSABLE',
  /** 409: an evaluation of this checkpoint with the same settings is stored; the body's `error.existing` holds it. */
  EvaluationExists: 'EVALUATION_EXISTS',
  /** 409: a simultaneous change got there first (a unique rule in the database); reload and try again. */
  Conflict: 'CONFLICT',
  /** 410: the invitation link was used, revoked or has expired. */
  InvitationUnusable: 'INVITATION_UNUSABLE',
  /** 410: the password-reset link was used, replaced or has expired. */
  ResetLinkUnusable: 'RESET_LINK_UNUSABLE',
  /** 413: the request body is larger than the server accepts. */
  PayloadTooLarge: 'PAYLOAD_TOO_LARGE',
  /** 422: the body or query failed validation; `fields` has one message per field. */
  ValidationFailed: 'VALIDATION_FAILED',
  /** 429: too many attempts in a short time. */
  RateLimited: 'RATE_LIMITED',
  /** 503: the server's worker queue is full; the answer carries `Retry-After` (seconds). */
  ServerBusy: 'SERVER_BUSY',
  /** 500: a fault on the server. */
  Internal: 'INTERNAL_ERROR',
  /** 401: the runner token was revoked by an admin (runner routes, see shared/api/runner-jobs.ts). */
  RunnerRevoked: 'RUNNER_REVOKED',
  /** 409: the run is not held by this runner (held by another, or by none). */
  RunNotHeld: 'RUN_NOT_HELD',
  /** 409 on a runner's claim: another runner's lease on the run is fresh; retry after `error.retryAfterSeconds`. */
  RunHeld: 'RUN_HELD',
  /** 409 on a runner's claim: the run no longer waits for a runner. */
  RunNotQueued: 'RUN_NOT_QUEUED',
} as const;

export type ErrorCode = (typeof ErrorCode)[keyof typeof ErrorCode];

/** Per-field messages of a 422 response, keyed by the field path joined with dots (`"email"`, `"items.0.name"`). */
export type FieldErrors = Record<string, string>;

export interface ApiErrorBody {
  error: {
    code: ErrorCode;
    message: string;
    fields?: FieldErrors;
  };
}

/** The one message for every failed sign-in, whatever the reason (no account probing). */
export const SIGN_IN_FAILED_MESSAGE = 'E-mail or password is wrong.';

export function isApiErrorBody(value: unknown): value is ApiErrorBody {
  if (typeof value !== 'object' || value === null || !('error' in value)) return false;
  const error = (value as { error: unknown }).error;
  return (
    typeof error === 'object' &&
    error !== null &&
    typeof (error as { code?: unknown }).code === 'string' &&
    typeof (error as { message?: unknown }).message === 'string'
  );
}
