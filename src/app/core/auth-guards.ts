import { inject } from '@angular/core';
import { CanActivateFn, Router } from '@angular/router';
import { AuthStore } from './auth-store';

/** Only for signed-in people; others go to sign-in and come back afterwards. */
export const signedInGuard: CanActivateFn = (_route, state) => {
  const auth = inject(AuthStore);
  if (auth.signedIn()) return true;
  return inject(Router).createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
};

/** Only for the instance admin. */
export const adminGuard: CanActivateFn = (_route, state) => {
  const auth = inject(AuthStore);
  const router = inject(Router);
  if (!auth.signedIn()) return router.createUrlTree(['/sign-in'], { queryParams: { returnUrl: state.url } });
  return auth.isAdmin() ? true : router.createUrlTree(['/benches']);
};

/** Sign-in and sign-up pages: a signed-in person goes where they were heading (or to their benches). */
export const signedOutGuard: CanActivateFn = (route) => {
  if (!inject(AuthStore).signedIn()) return true;
  const returnUrl = route.queryParamMap.get('returnUrl');
  const router = inject(Router);
  return returnUrl && returnUrl.startsWith('/') ? router.parseUrl(returnUrl) : router.createUrlTree(['/benches']);
};
