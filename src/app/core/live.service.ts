import { DestroyRef, Injectable, effect, inject, signal, untracked } from '@angular/core';
import { Observable, Subject, filter, share } from 'rxjs';
import type { Socket } from 'socket.io-client';
import { AuthService } from './auth.service';
import { READINGS_BATCH_EVENT, READINGS_EVENT } from '../../../shared/api/live-view';
import { LiveAlarmMessage, LiveConnection, LiveReadings, LiveReadingsBatch, WatchRequest } from './live-reading';

/** After the server refused the handshake, try again this much later (the token may have been renewed). */
const RETRY_AFTER_REFUSAL_MS = 15000;

/**
 * Live push from the server over socket.io. One connection for the whole app, open while signed in.
 * Screens call watch(...) for what they show; the requests are sent again after every reconnect.
 */
@Injectable({ providedIn: 'root' })
export class LiveService {
  private readonly auth = inject(AuthService);
  private socket: Socket | null = null;
  /** Bumped by every open and close, so a socket library that arrives late is not used for a closed session. */
  private openGeneration = 0;
  private retryTimer: ReturnType<typeof setTimeout> | null = null;
  private readonly watches = new Map<number, WatchRequest>();
  private nextWatchId = 1;
  private readonly readingsSubject = new Subject<LiveReadings>();
  private readonly batchSubject = new Subject<readonly LiveReadings[]>();
  private readonly connectionSignal = signal<LiveConnection>('offline');
  private readonly alarmSubject = new Subject<LiveAlarmMessage>();

  /** Every engine's live values, one engine at a time, for all that is watched (batches are taken apart). */
  readonly readings$: Observable<LiveReadings> = this.readingsSubject.asObservable().pipe(share());
  /**
   * The same values as they came: a fleet or site watcher gets one batch per interval with every engine that changed
   * (`readings-batch`); an engine's own message comes as a list of one. For screens that draw many engines at once.
   */
  readonly readingBatches$: Observable<readonly LiveReadings[]> = this.batchSubject.asObservable().pipe(share());
  readonly connection = this.connectionSignal.asReadonly();
  private readonly lostSinceSignal = signal<number | null>(null);
  /** When the open connection was lost (ms), while it stays lost; null when live or signed out. */
  readonly lostSince = this.lostSinceSignal.asReadonly();
  /** Every `alarm` message (an alarm changed); they come to a watch with `alarms: true`. */
  readonly alarms$: Observable<LiveAlarmMessage> = this.alarmSubject.asObservable().pipe(share());
  private readonly scopeSubject = new Subject<void>();
  /** The server re-scoped this user's live rooms (an administrator changed their sites): lists should be asked again. */
  readonly scopeChanged$: Observable<void> = this.scopeSubject.asObservable().pipe(share());

  constructor() {
    effect(() => {
      const signedIn = this.auth.signedIn();
      untracked(() => (signedIn ? this.open() : this.close()));
    });
    inject(DestroyRef).onDestroy(() => this.close());
  }

  /** Ask for pushes; call the returned function when the screen no longer needs them. */
  watch(request: WatchRequest): () => void {
    const id = this.nextWatchId++;
    this.watches.set(id, request);
    this.sendWatches();
    return () => {
      if (this.watches.delete(id)) this.sendWatches();
    };
  }

  /** The server replaces a socket's rooms on every `watch`, so it always gets the union of what screens ask for. */
  private sendWatches(): void {
    if (!this.socket?.connected || this.watches.size === 0) return;
    this.socket.emit('watch', mergeWatches([...this.watches.values()]));
  }

  readingsFor(engineId: number): Observable<LiveReadings> {
    return this.readings$.pipe(filter((r) => r.engineId === engineId));
  }

  private open(): void {
    this.close();
    this.connectionSignal.set('connecting');
    const generation = ++this.openGeneration;
    // socket.io is loaded only once someone is signed in: the sign-in page does not need it.
    import('socket.io-client').then(
      ({ io }) => {
        if (generation !== this.openGeneration) return; // signed out or signed in again meanwhile
        // the handshake carries the session cookie (same origin); no token is handled by page script
        this.connect(io({ reconnection: true, reconnectionDelayMax: 10000 }));
      },
      () => {
        // The app was updated on the server or the network dropped: a reload fetches it again.
        if (generation === this.openGeneration) this.connectionSignal.set('offline');
      },
    );
  }

  private connect(socket: Socket): void {
    this.socket = socket;
    socket.on('connect', () => {
      this.connectionSignal.set('connected');
      this.lostSinceSignal.set(null);
      this.sendWatches();
    });
    // The server ended the session (account disabled, role, sites or password changed): it says so, then closes.
    socket.on('session-ended', (msg: { reason?: unknown } | null) => {
      const reason = typeof msg?.reason === 'string' ? msg.reason : null;
      this.auth.expire(reason ? `${reason} Please sign in again.` : undefined);
    });
    socket.on('disconnect', (reason: string) => {
      this.connectionSignal.set(socket.active ? 'connecting' : 'offline');
      this.markLost();
      // closed by the server on purpose: ask whether the session still holds (a 401 signs out with a message)
      if (reason === 'io server disconnect') {
        void this.auth.refresh().then(() => {
          // still signed in (e.g. the server was restarted): connect again a little later
          if (this.socket === socket && this.auth.signedIn() && !this.retryTimer) {
            this.retryTimer = setTimeout(() => {
              this.retryTimer = null;
              if (this.socket === socket && this.auth.signedIn()) socket.connect();
            }, RETRY_AFTER_REFUSAL_MS);
          }
        });
      }
    });
    socket.on('connect_error', () => {
      this.markLost();
      if (socket.active) {
        this.connectionSignal.set('connecting'); // a network problem: socket.io retries by itself
        return;
      }
      // Refused at the handshake (session ended or expired): check the session, then retry later.
      this.connectionSignal.set('refused');
      void this.auth.refresh();
      if (this.retryTimer) clearTimeout(this.retryTimer);
      this.retryTimer = setTimeout(() => {
        this.retryTimer = null;
        if (this.socket === socket && this.auth.signedIn()) socket.connect();
      }, RETRY_AFTER_REFUSAL_MS);
    });
    socket.on(READINGS_EVENT, (msg: LiveReadings) => {
      if (isReadings(msg)) this.deliver([msg]);
    });
    socket.on(READINGS_BATCH_EVENT, (batch: LiveReadingsBatch) => {
      if (Array.isArray(batch?.engines)) this.deliver(batch.engines.filter(isReadings));
    });
    socket.on('rooms', () => this.scopeSubject.next());
    socket.on('alarm', (msg: LiveAlarmMessage) => {
      if (msg && typeof msg.id === 'number' && typeof msg.engineId === 'number') this.alarmSubject.next(msg);
    });
  }

  private deliver(list: readonly LiveReadings[]): void {
    if (!list.length) return;
    for (const msg of list) this.readingsSubject.next(msg);
    this.batchSubject.next(list);
  }

  private markLost(): void {
    if (this.lostSinceSignal() === null) this.lostSinceSignal.set(Date.now());
  }

  private close(): void {
    this.openGeneration++;
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.retryTimer = null;
    this.socket?.removeAllListeners();
    this.socket?.disconnect();
    this.socket = null;
    this.connectionSignal.set('offline');
    this.lostSinceSignal.set(null); // signed out: nothing was lost
  }
}

function isReadings(msg: LiveReadings | null | undefined): msg is LiveReadings {
  return !!msg && typeof msg.engineId === 'number' && !!msg.values;
}

/** One watch request covering all of them. */
export function mergeWatches(requests: WatchRequest[]): WatchRequest {
  const siteIds = new Set<number>();
  const engineIds = new Set<number>();
  let fleet = false;
  let alarms = false;
  for (const r of requests) {
    if (r.fleet) fleet = true;
    if (r.alarms) alarms = true;
    r.siteIds?.forEach((id) => siteIds.add(id));
    r.engineIds?.forEach((id) => engineIds.add(id));
  }
  const merged: WatchRequest = {};
  if (fleet) merged.fleet = true;
  if (alarms) merged.alarms = true;
  if (siteIds.size) merged.siteIds = [...siteIds];
  if (engineIds.size) merged.engineIds = [...engineIds];
  return merged;
}
