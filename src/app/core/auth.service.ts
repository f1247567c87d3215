import { HttpBackend, HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, computed, inject, signal, untracked } from '@angular/core';
import { Router } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { LoginResponse, Role, User } from './user';

const TOKEN_KEY = 'jw.token';
const USER_KEY = 'jw.user';

/** Why a sign-in attempt failed, in words the sign-in page shows as they are. */
export type SignInFailure = 'wrong-credentials' | 'too-many-tries' | 'unreachable' | 'server-error';

export class SignInError extends Error {
  constructor(readonly reason: SignInFailure, message: string) {
    super(message);
  }
}

/**
 * The signed-in user. The token lives in localStorage so a reload keeps the session;
 * GET /api/auth/me on start confirms it (an expired token then signs out through the interceptor).
 */
@Injectable({ providedIn: 'root' })
export class AuthService {
  // HttpBackend skips interceptors: sign-in and the start-up check handle their own errors.
  private readonly rawHttp = new HttpClient(inject(HttpBackend));
  private readonly router = inject(Router);

  private readonly tokenSignal = signal<string | null>(readStorage(TOKEN_KEY));
  private readonly userSignal = signal<User | null>(parseUser(readStorage(USER_KEY)));
  private readonly noticeSignal = signal<string | null>(null);

  readonly token = this.tokenSignal.asReadonly();
  readonly user = this.userSignal.asReadonly();
  readonly role = computed<Role | null>(() => this.userSignal()?.role ?? null);
  readonly signedIn = computed(() => this.tokenSignal() !== null && this.userSignal() !== null);
  /** A message for the sign-in page, e.g. after the session expired. */
  readonly notice = this.noticeSignal.asReadonly();

  constructor() {
    if (this.tokenSignal()) void this.refresh();
  }

  hasRole(...roles: Role[]): boolean {
    const role = this.role();
    return role !== null && roles.includes(role);
  }

  async signIn(email: string, password: string): Promise<User> {
    try {
      const res = await firstValueFrom(this.rawHttp.post<LoginResponse>('/api/auth/login', { email, password }));
      this.store(res.token, res.user);
      this.noticeSignal.set(null);
      return res.user;
    } catch (err) {
      throw toSignInError(err);
    }
  }

  /** Confirms the stored token with the server and refreshes the user's name and role. */
  async refresh(): Promise<void> {
    const token = this.tokenSignal();
    if (!token) return;
    try {
      const me = await firstValueFrom(
        this.rawHttp.get<User | { user: User }>('/api/auth/me', { headers: { Authorization: `Bearer ${token}` } }),
      );
      const user = 'user' in me ? me.user : me;
      if (this.tokenSignal() === token) this.store(token, user);
    } catch (err) {
      // Only a refused token ends the session; an unreachable server leaves it for later.
      if (err instanceof HttpErrorResponse && err.status === 401) this.expire();
    }
  }

  signOut(notice: string | null = null, returnUrl: string | null = null): void {
    removeStorage(TOKEN_KEY);
    removeStorage(USER_KEY);
    this.tokenSignal.set(null);
    this.userSignal.set(null);
    this.noticeSignal.set(notice);
    void this.router.navigate(['/sign-in'], returnUrl ? { queryParams: { returnUrl } } : {});
  }

  /** The server refused our token: sign out and say why. */
  expire(): void {
    if (!this.tokenSignal()) return;
    // During a navigation (e.g. the first one after a reload) the place the user was going is the one to return to.
    const nav = untracked(this.router.currentNavigation);
    const url = nav ? this.router.serializeUrl(nav.finalUrl ?? nav.extractedUrl) : this.router.url;
    this.signOut('Your session has ended. Please sign in again.', url && url !== '/' && !url.startsWith('/sign-in') ? url : null);
  }

  clearNotice(): void {
    this.noticeSignal.set(null);
  }

  private store(token: string, user: User): void {
    writeStorage(TOKEN_KEY, token);
    writeStorage(USER_KEY, JSON.stringify(user));
    this.tokenSignal.set(token);
    this.userSignal.set(user);
  }
}

function toSignInError(err: unknown): SignInError {
  if (err instanceof HttpErrorResponse) {
    if (err.status === 0) return new SignInError('unreachable', 'The server cannot be reached. Check the network and try again.');
    if (err.status === 400 || err.status === 401) return new SignInError('wrong-credentials', 'E-mail or password is wrong.');
    if (err.status === 429) return new SignInError('too-many-tries', 'Too many sign-in attempts. Wait a few minutes, then try again.');
    if (err.status === 502 || err.status === 503 || err.status === 504) {
      return new SignInError('unreachable', 'The server is not answering. Try again in a moment.');
    }
  }
  return new SignInError('server-error', 'The server could not sign you in. Try again; if it keeps failing, tell your administrator.');
}

function parseUser(raw: string | null): User | null {
  if (!raw) return null;
  try {
    const u = JSON.parse(raw) as User;
    return typeof u?.id === 'number' && typeof u.role === 'string' ? u : null;
  } catch {
    return null;
  }
}

// localStorage can be missing or blocked (private windows, tests): the app then simply forgets on reload.
function readStorage(key: string): string | null {
  try {
    return globalThis.localStorage?.getItem(key) ?? null;
  } catch {
    return null;
  }
}
function writeStorage(key: string, value: string): void {
  try {
    globalThis.localStorage?.setItem(key, value);
  } catch {
    /* not kept across reloads */
  }
}
function removeStorage(key: string): void {
  try {
    globalThis.localStorage?.removeItem(key);
  } catch {
    /* nothing to remove */
  }
}
