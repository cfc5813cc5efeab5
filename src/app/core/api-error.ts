import { HttpErrorResponse } from '@angular/common/http';

/** A failed request, normalised by the error interceptor. `message` is a sentence that says what to do. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields: Record<string, string> = {},
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

const FALLBACK_BY_STATUS: Record<number, string> = {
  0: 'Cannot reach the Noisewright server. Check that it is running and your connection works, then try again.',
  400: 'The server could not read this request. Reload the page and try again.',
  401: 'You are not signed in. Sign in and try again.',
  403: 'Your role on this bench does not allow this. Ask an owner of the bench.',
  404: 'This item does not exist or you are not a member of its bench. Check the link or ask for an invitation.',
  409: 'This conflicts with the current state. Reload the page and try again.',
  410: 'This link has been used, revoked or has expired. Ask for a new one.',
  413: 'The upload is too large. Choose a smaller file.',
  422: 'Some fields are not valid. Correct them and try again.',
  429: 'Too many attempts. Wait a minute and try again.',
};

function isStringRecord(value: unknown): value is Record<string, string> {
  return typeof value === 'object' && value !== null &&
    Object.values(value).every((v) => typeof v === 'string');
}

/** Turns any HTTP failure into an ApiError with a readable message. */
export function toApiError(response: HttpErrorResponse): ApiError {
  const body: unknown = response.error;
  const error = typeof body === 'object' && body !== null ? (body as { error?: unknown }).error : undefined;
  if (typeof error === 'object' && error !== null) {
    const { code, message, fields } = error as { code?: unknown; message?: unknown; fields?: unknown };
    if (typeof code === 'string' && typeof message === 'string') {
      return new ApiError(response.status, code, message, isStringRecord(fields) ? fields : {});
    }
  }
  const status = response.status;
  const fallback = FALLBACK_BY_STATUS[status] ??
    (status >= 500
      ? 'The server ran into a problem. Try again in a moment; if it keeps happening, tell your admin.'
      : 'The request failed. Try again.');
  return new ApiError(status, status === 0 ? 'NETWORK' : `HTTP_${status}`, fallback);
}

/** Message to show for an unknown thrown value (ApiError or anything else). */
export function messageOf(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  return 'Something went wrong. Try again; if it keeps happening, reload the page.';
}
