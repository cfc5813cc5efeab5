import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { AuthResponse, User } from './api-types';

export const TOKEN_STORAGE_KEY = 'noisewright.token';

function readStoredToken(): string | null {
  try {
    return localStorage.getItem(TOKEN_STORAGE_KEY);
  } catch {
    return null;
  }
}

function writeStoredToken(token: string | null): void {
  try {
    if (token) localStorage.setItem(TOKEN_STORAGE_KEY, token);
    else localStorage.removeItem(TOKEN_STORAGE_KEY);
  } catch {
    // Storage can be unavailable (private mode); the session then lasts until reload.
  }
}

/** Who is signed in. The token lives in localStorage so a reload keeps the session. */
@Injectable({ providedIn: 'root' })
export class AuthStore {
  private readonly http = inject(HttpClient);
  private readonly tokenState = signal<string | null>(readStoredToken());
  private readonly userState = signal<User | null>(null);

  readonly token = this.tokenState.asReadonly();
  readonly user = this.userState.asReadonly();
  readonly signedIn = computed(() => this.tokenState() !== null && this.userState() !== null);
  readonly isAdmin = computed(() => this.userState()?.isAdmin === true);

  /** Called once at start-up: checks a stored token and loads the user, or forgets a stale token. */
  async restore(): Promise<void> {
    if (!this.tokenState()) return;
    try {
      const { user } = await firstValueFrom(this.http.get<{ user: User }>('/api/auth/me'));
      this.userState.set(user);
    } catch {
      this.clear();
    }
  }

  async signIn(email: string, password: string): Promise<User> {
    const answer = await firstValueFrom(this.http.post<AuthResponse>('/api/auth/signin', { email, password }));
    this.accept(answer);
    return answer.user;
  }

  /** `setupCode`: the one-time code from the server log that makes a production server's first account the admin. */
  async signUp(email: string, password: string, displayName: string, setupCode?: string): Promise<User> {
    const answer = await firstValueFrom(
      this.http.post<AuthResponse>('/api/auth/signup', { email, password, displayName, ...(setupCode ? { setupCode } : {}) }),
    );
    this.accept(answer);
    return answer.user;
  }

  private readonly signOutHooks = new Set<() => Promise<void>>();

  /**
   * Work to finish while the session is still valid, run by `signOut` before the token is dropped (the run
   * scheduler stops this tab's training runs and saves their checkpoints). Returns a function that removes it.
   */
  beforeSignOut(hook: () => Promise<void>): () => void {
    this.signOutHooks.add(hook);
    return () => this.signOutHooks.delete(hook);
  }

  /** Tells the server to drop every token of the user, then forgets the local session whatever happens. */
  async signOut(): Promise<void> {
    for (const hook of this.signOutHooks) {
      try {
        await hook();
      } catch {
        // A hook that fails must not keep the person signed in.
      }
    }
    try {
      if (this.tokenState()) await firstValueFrom(this.http.post<void>('/api/auth/signout', {}));
    } catch {
      // The local session is dropped anyway; an expired token is as good as signed out.
    } finally {
      this.clear();
    }
  }

  async changePassword(currentPassword: string, newPassword: string): Promise<void> {
    const { token } = await firstValueFrom(
      this.http.post<{ token: string }>('/api/auth/password', { currentPassword, newPassword }),
    );
    this.tokenState.set(token);
    writeStoredToken(token);
  }

  /** Forgets the session locally (used on 401 and sign-out). */
  clear(): void {
    this.tokenState.set(null);
    this.userState.set(null);
    writeStoredToken(null);
  }

  private accept({ token, user }: AuthResponse): void {
    this.tokenState.set(token);
    this.userState.set(user);
    writeStoredToken(token);
  }
}
