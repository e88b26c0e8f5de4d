import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';

import type { SessionResponse, SignupRequest, User } from '@shared/api/auth';

export type { User };
/** `GET /api/auth/session`: 200, or 503 `database_unavailable` while the server cannot reach its database (callers treat a failure as "not signed in yet"; the next request shows the message). */
export type SessionInfo = SessionResponse;

/**
 * Who is signed in, and the CSRF token the API wants on every state-changing request.
 *
 * The state is a signal read by the top bar, guards and pages; it is loaded once on demand
 * (`ensureLoaded()`) and re-read after sign-in and sign-out because the server issues a new token
 * then. Pages never attach the token themselves: the `apiInterceptor` does it for every
 * POST/PUT/PATCH/DELETE under /api.
 */
@Injectable({ providedIn: 'root' })
export class Session {
  private readonly http = inject(HttpClient);
  private readonly state = signal<SessionInfo | null>(null);
  private pending: Promise<SessionInfo> | null = null;

  /** True once the session has been read from the server. */
  readonly loaded = computed(() => this.state() !== null);
  readonly user = computed(() => this.state()?.user ?? null);
  readonly signedIn = computed(() => this.user() !== null);
  /** The current CSRF token, or null before the session has been read. */
  readonly csrfToken = computed(() => this.state()?.csrfToken ?? null);

  /** The session as last read, reading it first if it has not been read yet. */
  ensureLoaded(): Promise<SessionInfo> {
    const current = this.state();
    return current ? Promise.resolve(current) : this.refresh();
  }

  /** Reads the session from the server (concurrent callers share one request). */
  refresh(): Promise<SessionInfo> {
    this.pending ??= firstValueFrom(this.http.get<SessionInfo>('/api/auth/session'))
      .then((info) => {
        this.state.set(info);
        return info;
      })
      .finally(() => {
        this.pending = null;
      });
    return this.pending;
  }

  async signIn(email: string, password: string): Promise<User> {
    await firstValueFrom(this.http.post<{ user: User }>('/api/auth/signin', { email, password }));
    return this.userAfterChange();
  }

  async signUp(request: SignupRequest): Promise<User> {
    await firstValueFrom(this.http.post<{ user: User }>('/api/auth/signup', request));
    return this.userAfterChange();
  }

  async signOut(): Promise<void> {
    try {
      await firstValueFrom(this.http.post('/api/auth/signout', null));
    } finally {
      // Whatever the answer, forget the user here and fetch the new anonymous token.
      this.state.set(null);
      await this.refresh().catch(() => undefined);
    }
  }

  /**
   * Called when the API answers 401 to an ordinary request: the server-side session has ended
   * (expired, or signed out in another tab). The next state-changing request reads a fresh token.
   */
  sessionEnded(): void {
    this.state.set(null);
  }

  private async userAfterChange(): Promise<User> {
    // The server rotates the session (and with it the token) at sign-in.
    const info = await this.refresh();
    if (!info.user) throw new Error('Signed in, but the session was not kept. Are cookies enabled?');
    return info.user;
  }
}
