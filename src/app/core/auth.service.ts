import { HttpBackend, HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, computed, inject, signal, untracked } from '@angular/core';
import { Router } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { clearCachedApiData } from './cached-api-data';
import { CSRF_HEADERS, SignInResponse, Role, User } from './user';

/** Why a sign-in attempt failed, in words the sign-in page shows as they are. */
export type SignInFailure = 'wrong-credentials' | 'too-many-tries' | 'unreachable' | 'server-error';

export class SignInError extends Error {
  constructor(
    readonly reason: SignInFailure,
    message: string,
  ) {
    super(message);
  }
}

/** What the sign-in page says when the server ended the session. */
export const SESSION_ENDED = 'Your session has ended. Please sign in again.';

/**
 * The signed-in user. The session itself is an httpOnly cookie the server sets at sign-in: page
 * script never sees it, so nothing is kept in localStorage. Who is signed in comes from
 * GET /api/auth/me, asked before the first navigation (restore) and again when the server
 * refuses the live connection.
 */
@Injectable({ providedIn: 'root' })
export class AuthService {
  // HttpBackend skips interceptors: sign-in and the session checks handle their own errors.
  private readonly rawHttp = new HttpClient(inject(HttpBackend));
  private readonly router = inject(Router);

  private readonly userSignal = signal<User | null>(null);
  private readonly noticeSignal = signal<string | null>(null);

  readonly user = this.userSignal.asReadonly();
  readonly role = computed<Role | null>(() => this.userSignal()?.role ?? null);
  readonly signedIn = computed(() => this.userSignal() !== null);
  /** A message for the sign-in page, e.g. after the session ended. */
  readonly notice = this.noticeSignal.asReadonly();

  hasRole(...roles: Role[]): boolean {
    const role = this.role();
    return role !== null && roles.includes(role);
  }

  /** At start: is there a session (the cookie is sent by the browser)? Never throws. */
  async restore(): Promise<void> {
    try {
      this.userSignal.set(await this.askMe());
    } catch (err) {
      this.userSignal.set(null);
      if (!(err instanceof HttpErrorResponse && err.status === 401)) {
        this.noticeSignal.set('The server could not be reached to check your sign-in. Try again in a moment.');
      }
    }
  }

  async signIn(email: string, password: string): Promise<User> {
    try {
      const res = await firstValueFrom(this.rawHttp.post<SignInResponse>('/api/auth/login', { email, password, session: 'cookie' }, { headers: CSRF_HEADERS }));
      this.userSignal.set(res.user);
      this.noticeSignal.set(null);
      return res.user;
    } catch (err) {
      throw toSignInError(err);
    }
  }

  /** Confirms the session with the server and refreshes the user's name and role; a refused session signs out. */
  async refresh(): Promise<void> {
    if (!this.userSignal()) return;
    try {
      const user = await this.askMe();
      if (this.userSignal()) this.userSignal.set(user);
    } catch (err) {
      // Only a refused session ends it; an unreachable server leaves it for later.
      if (err instanceof HttpErrorResponse && err.status === 401) this.expire();
    }
  }

  signOut(notice: string | null = null, returnUrl: string | null = null): void {
    // the server clears the cookie; the page cannot (httpOnly)
    this.rawHttp.post('/api/auth/logout', {}, { headers: CSRF_HEADERS }).subscribe({ error: () => undefined });
    // nothing of this user's data stays in the browser's cache (never fails the sign-out)
    clearCachedApiData().catch(() => undefined);
    this.userSignal.set(null);
    this.noticeSignal.set(notice);
    void this.router.navigate(['/sign-in'], returnUrl ? { queryParams: { returnUrl } } : {});
  }

  /** The server ended or refused our session: to the sign-in page, saying why. */
  expire(message: string = SESSION_ENDED): void {
    if (!this.userSignal()) return;
    // During a navigation (e.g. the first one after a reload) the place the user was going is the one to return to.
    const nav = untracked(this.router.currentNavigation);
    const url = nav ? this.router.serializeUrl(nav.finalUrl ?? nav.extractedUrl) : this.router.url;
    this.signOut(message, url && url !== '/' && !url.startsWith('/sign-in') ? url : null);
  }

  clearNotice(): void {
    this.noticeSignal.set(null);
  }

  private async askMe(): Promise<User> {
    const me = await firstValueFrom(this.rawHttp.get<User | { user: User }>('/api/auth/me', { headers: CSRF_HEADERS }));
    return 'user' in me ? me.user : me;
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
