import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { ActivatedRouteSnapshot, Router, RouterStateSnapshot, UrlTree, convertToParamMap, provideRouter } from '@angular/router';
import { adminGuard, signedInGuard, signedOutGuard } from './auth-guards';
import { apiErrorInterceptor, authTokenInterceptor } from './auth-interceptors';
import { AuthStore } from './auth-store';

function run(guard: typeof signedInGuard, url: string, query: Record<string, string> = {}) {
  const route = { queryParamMap: convertToParamMap(query) } as ActivatedRouteSnapshot;
  const state = { url } as RouterStateSnapshot;
  return TestBed.runInInjectionContext(() => guard(route, state));
}

async function signIn(isAdmin: boolean): Promise<void> {
  const done = TestBed.inject(AuthStore).signIn('kit@example.org', 'secret-password');
  TestBed.inject(HttpTestingController).expectOne('/api/auth/signin').flush({
    token: 't1',
    user: { id: 'u1', email: 'kit@example.org', displayName: 'Kit', isAdmin, createdAt: '2026-01-01T00:00:00Z' },
  });
  await done;
}

describe('auth guards', () => {
  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([authTokenInterceptor, apiErrorInterceptor])),
        provideHttpClientTesting(),
      ],
    });
  });

  it('sends a signed-out visitor to sign-in with the page as return URL', () => {
    const result = run(signedInGuard, '/benches/b1/runs');
    expect(result).toBeInstanceOf(UrlTree);
    expect(TestBed.inject(Router).serializeUrl(result as UrlTree)).toBe('/sign-in?returnUrl=%2Fbenches%2Fb1%2Fruns');
  });

  it('lets a signed-in person through', async () => {
    await signIn(false);
    expect(run(signedInGuard, '/benches')).toBe(true);
  });

  it('keeps non-admins out of the admin page and lets the admin in', async () => {
    const router = TestBed.inject(Router);
    expect(router.serializeUrl(run(adminGuard, '/admin') as UrlTree)).toBe('/sign-in?returnUrl=%2Fadmin');
    await signIn(false);
    expect(router.serializeUrl(run(adminGuard, '/admin') as UrlTree)).toBe('/benches');
    TestBed.inject(AuthStore).clear();
    await signIn(true);
    expect(run(adminGuard, '/admin')).toBe(true);
  });

  it('sends a signed-in person away from sign-in, to the return URL when it is a path of the app', async () => {
    const router = TestBed.inject(Router);
    expect(run(signedOutGuard, '/sign-in')).toBe(true);
    await signIn(false);
    expect(router.serializeUrl(run(signedOutGuard, '/sign-in', { returnUrl: '/invite/abc' }) as UrlTree)).toBe('/invite/abc');
    expect(router.serializeUrl(run(signedOutGuard, '/sign-in', { returnUrl: 'https://elsewhere.example' }) as UrlTree))
      .toBe('/benches');
  });
});
