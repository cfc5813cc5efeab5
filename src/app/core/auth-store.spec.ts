import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { AuthStore, TOKEN_STORAGE_KEY } from './auth-store';

function setUp() {
  localStorage.setItem(TOKEN_STORAGE_KEY, 'token-1');
  TestBed.configureTestingModule({ providers: [provideZonelessChangeDetection(), provideHttpClient(), provideHttpClientTesting()] });
  return { auth: TestBed.inject(AuthStore), http: TestBed.inject(HttpTestingController) };
}

describe('AuthStore.signOut', () => {
  afterEach(() => localStorage.clear());

  it('runs the before-sign-out work while the token is still there, then signs out', async () => {
    const { auth, http } = setUp();
    const seen: (string | null)[] = [];
    auth.beforeSignOut(async () => { seen.push(auth.token()); });
    const done = auth.signOut();
    await Promise.resolve();
    await new Promise((r) => setTimeout(r));
    http.expectOne('/api/auth/signout').flush(null);
    await done;
    expect(seen).toEqual(['token-1']);
    expect(auth.token()).toBeNull();
    expect(localStorage.getItem(TOKEN_STORAGE_KEY)).toBeNull();
  });

  it('signs out even when that work fails, and a removed hook is not run', async () => {
    const { auth, http } = setUp();
    auth.beforeSignOut(async () => { throw new Error('worker gone'); });
    let removedRan = false;
    const remove = auth.beforeSignOut(async () => { removedRan = true; });
    remove();
    const done = auth.signOut();
    await new Promise((r) => setTimeout(r));
    http.expectOne('/api/auth/signout').flush(null);
    await done;
    expect(auth.token()).toBeNull();
    expect(removedRan).toBe(false);
  });
});
