import { HttpErrorResponse, HttpInterceptorFn } from '@angular/common/http';
import { inject } from '@angular/core';
import { Router } from '@angular/router';
import { catchError, throwError } from 'rxjs';
import { toApiError } from './api-error';
import { ErrorCode } from './api-types';
import { AuthStore } from './auth-store';

/** Attaches the bearer token to calls of our own API. */
export const authTokenInterceptor: HttpInterceptorFn = (req, next) => {
  const token = inject(AuthStore).token();
  if (!token || !req.url.startsWith('/api/') || req.headers.has('Authorization')) return next(req);
  return next(req.clone({ setHeaders: { Authorization: `Bearer ${token}` } }));
};

/**
 * Turns every HTTP failure into an ApiError `{ code, message, fields }`. When a request that carried
 * a token answers 401, the session is over: forget it and go to sign-in, coming back here afterwards.
 * A 401 without a token (a wrong password on the sign-in form), or a 401 for a wrong current password
 * (code BAD_CREDENTIALS), is left to the page that asked.
 */
export const apiErrorInterceptor: HttpInterceptorFn = (req, next) => {
  const auth = inject(AuthStore);
  const router = inject(Router);
  return next(req).pipe(
    catchError((failure: unknown) => {
      if (!(failure instanceof HttpErrorResponse)) return throwError(() => failure);
      const error = toApiError(failure);
      if (error.status === 401 && req.headers.has('Authorization') && error.code !== ErrorCode.BadCredentials) {
        auth.clear();
        const current = router.url;
        const returnUrl = current.startsWith('/sign-in') ? undefined : current;
        void router.navigate(['/sign-in'], { queryParams: returnUrl ? { returnUrl } : {} });
      }
      return throwError(() => error);
    }),
  );
};
