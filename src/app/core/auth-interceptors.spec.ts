import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { ApiError } from './api-error';
import { apiErrorInterceptor, authTokenInterceptor } from './auth-interceptors';
import { AuthStore, TOKEN_STORAGE_KEY } from './auth-store';

describe('HTTP interceptors', () => {
  let http: HttpClient;
  let backend: HttpTestingController;
  let router: Router;

  async function signIn(): Promise<void> {
    const done = TestBed.inject(AuthStore).signIn('kit@example.org', 'secret-password');
    const req = backend.expectOne('/api/auth/signin');
    expect(req.request.headers.has('Authorization')).toBe(false);
    req.flush({ token: 'tok-123', user: { id: 'u1', email: 'kit@example.org', displayName: 'Kit', isAdmin: false, createdAt: '' } });
    await done;
  }

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
    http = TestBed.inject(HttpClient);
    backend = TestBed.inject(HttpTestingController);
    router = TestBed.inject(Router);
  });

  afterEach(() => backend.verify());

  it('attaches the bearer token to API calls only', async () => {
    await signIn();
    http.get('/api/benches').subscribe();
    expect(backend.expectOne('/api/benches').request.headers.get('Authorization')).toBe('Bearer tok-123');
    http.get('/tfjs-wasm/x.wasm').subscribe();
    expect(backend.expectOne('/tfjs-wasm/x.wasm').request.headers.has('Authorization')).toBe(false);
  });

  it('on 401 for a signed-in call: forgets the session and goes to sign-in with a return URL', async () => {
    await signIn();
    const navigate = vi.spyOn(router, 'navigate').mockResolvedValue(true);
    vi.spyOn(router, 'url', 'get').mockReturnValue('/benches/b1');
    const answer = firstValueFrom(http.get('/api/benches/b1'));
    backend.expectOne('/api/benches/b1').flush(
      { error: { code: 'NOT_SIGNED_IN', message: 'Your session has ended. Sign in again.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    const error = await answer.catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect((error as ApiError).message).toBe('Your session has ended. Sign in again.');
    const auth = TestBed.inject(AuthStore);
    expect(auth.signedIn()).toBe(false);
    expect(localStorage.getItem(TOKEN_STORAGE_KEY)).toBeNull();
    expect(navigate).toHaveBeenCalledWith(['/sign-in'], { queryParams: { returnUrl: '/benches/b1' } });
  });

  it('leaves the session alone on a failed sign-in (401 without a token)', async () => {
    const navigate = vi.spyOn(router, 'navigate');
    const attempt = TestBed.inject(AuthStore).signIn('kit@example.org', 'wrong');
    backend.expectOne('/api/auth/signin').flush(
      { error: { code: 'BAD_CREDENTIALS', message: 'E-mail or password is wrong.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await expect(attempt).rejects.toMatchObject({ status: 401, code: 'BAD_CREDENTIALS' });
    expect(navigate).not.toHaveBeenCalled();
  });

  it('normalises validation errors with their fields, and answers without a body get a readable message', async () => {
    const invalid = firstValueFrom(http.post('/api/benches', {}));
    backend.expectOne('/api/benches').flush(
      { error: { code: 'VALIDATION_FAILED', message: 'Some fields are not valid.', fields: { name: 'Give the bench a name.' } } },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await expect(invalid).rejects.toMatchObject({ status: 422, code: 'VALIDATION_FAILED', fields: { name: 'Give the bench a name.' } });

    const broken = firstValueFrom(http.get('/api/health'));
    backend.expectOne('/api/health').flush('<html>proxy error</html>', { status: 502, statusText: 'Bad Gateway' });
    const error = (await broken.catch((e: unknown) => e)) as ApiError;
    expect(error.code).toBe('HTTP_502');
    expect(error.message).toMatch(/Try again/);
  });
});
