import { HttpErrorResponse } from '@angular/common/http';
import { Injectable, signal } from '@angular/core';

/**
 * A call that got no answer from our server: no network (status 0), or a gateway saying the server
 * did not answer (502-504; the service worker answers 504 when offline and nothing is cached).
 */
export function isNoAnswer(err: unknown): boolean {
  return err instanceof HttpErrorResponse && (err.status === 0 || err.status === 502 || err.status === 503 || err.status === 504);
}

/** Whether the browser has a network (navigator.onLine and its online/offline events). */
@Injectable({ providedIn: 'root' })
export class NetworkStatus {
  private readonly onlineSignal = signal(typeof navigator === 'undefined' ? true : navigator.onLine);
  readonly online = this.onlineSignal.asReadonly();

  constructor() {
    if (typeof window === 'undefined') return;
    window.addEventListener('online', () => this.onlineSignal.set(true));
    window.addEventListener('offline', () => this.onlineSignal.set(false));
  }

  /** A request failed without an answer: the network is gone even if the browser has not said so yet. */
  noAnswer(): void {
    this.onlineSignal.set(false);
  }

  /** Something answered again. */
  answered(): void {
    this.onlineSignal.set(true);
  }
}
