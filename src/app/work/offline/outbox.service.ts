import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { DestroyRef, Injectable, computed, effect, inject, signal, untracked } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { AuthService } from '../../core/auth.service';
import { NetworkStatus, isNoAnswer } from '../../core/network-status';
import { errorText } from '../work-api';
import type { OutboxEntry, OutboxKind } from './outbox-entry';
import { OutboxStore } from './outbox-store';

/** While something waits, try again this often (besides the browser's "online" event). */
const RETRY_EVERY_MS = 15_000;
/** Sent entries stay listed this long, so the technician sees what went. */
const KEEP_SENT_MS = 3 * 24 * 3600 * 1000;

export interface RecordInput {
  orderId: number;
  orderTitle: string;
  stepId: number | null;
  stepTitle: string;
  kind: OutboxKind;
  body?: Record<string, unknown> | null;
  file?: Blob | null;
  fileName?: string | null;
}

/** Why a send stopped: try again later (no network, server fault, session) or the server refused it for good. */
function refusedForGood(err: unknown): boolean {
  if (!(err instanceof HttpErrorResponse)) return false;
  if (err.status === 0 || err.status >= 500 || err.status === 401 || err.status === 408 || err.status === 429) return false;
  // the same key is still being handled on the server: not a conflict
  if (err.status === 409 && err.headers?.get('Retry-After')) return false;
  return true;
}

/**
 * The technician's outbox: drafts, completed steps and photos recorded without a network are kept in
 * IndexedDB and sent when the network returns, one at a time in the order they were recorded, each with
 * its own Idempotency-Key so a retry after a lost answer is stored once. A refusal (the order was
 * cancelled or reassigned meanwhile) stops only that entry: it stays, with what was typed, as a conflict.
 */
@Injectable({ providedIn: 'root' })
export class Outbox {
  private readonly store = inject(OutboxStore);
  private readonly http = inject(HttpClient);
  private readonly auth = inject(AuthService);
  private readonly net = inject(NetworkStatus);

  private readonly entriesSignal = signal<OutboxEntry[]>([]);
  readonly entries = this.entriesSignal.asReadonly();
  readonly waiting = computed(() => this.entriesSignal().filter((e) => e.state === 'waiting'));
  readonly conflicts = computed(() => this.entriesSignal().filter((e) => e.state === 'conflict'));
  readonly sending = signal(false);
  /** Raised after entries were stored or refused by the server: screens showing those orders load them again. */
  readonly sentRound = signal(0);
  /** The last reason a send stopped and will be tried again, for the screen. */
  readonly retryReason = signal<string | null>(null);
  private flushing: Promise<void> | null = null;

  constructor() {
    effect(() => {
      const user = this.auth.user();
      untracked(() => void this.load(user?.id ?? null));
    });
    effect(() => {
      if (this.net.online()) untracked(() => void this.flush());
    });
    const timer = setInterval(() => {
      if (this.waiting().length) void this.flush();
    }, RETRY_EVERY_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }

  forOrder(orderId: number): OutboxEntry[] {
    return this.entriesSignal().filter((e) => e.orderId === orderId);
  }

  /** Keeps one change on the device and sends it as soon as possible. A draft replaces the step's draft still waiting. */
  async record(input: RecordInput): Promise<void> {
    const userId = this.auth.user()?.id;
    if (!userId) throw new Error('Sign in first.');
    const pendingDraft =
      input.kind === 'draft' ? this.waiting().find((e) => e.kind === 'draft' && e.orderId === input.orderId && e.stepId === input.stepId) : undefined;
    if (pendingDraft) {
      await this.store.put({ ...pendingDraft, body: { ...(pendingDraft.body ?? {}), ...(input.body ?? {}) }, recordedAt: Date.now() });
    } else {
      await this.store.add({
        key: newKey(input.kind),
        userId,
        orderId: input.orderId,
        orderTitle: input.orderTitle,
        stepId: input.stepId,
        stepTitle: input.stepTitle,
        kind: input.kind,
        body: input.body ?? null,
        file: input.file ?? null,
        fileName: input.fileName ?? null,
        recordedAt: Date.now(),
        state: 'waiting',
        sentAt: null,
        message: null,
      });
    }
    await this.load(userId);
    if (this.net.online()) void this.flush();
  }

  /** A conflict the technician has dealt with (copied what was needed): removed from the device. */
  async dismiss(seq: number): Promise<void> {
    await this.store.remove(seq);
    await this.load(this.auth.user()?.id ?? null);
  }

  /** Sends a refused entry once more (e.g. after the planner reopened the order), with a new key. */
  async retry(seq: number): Promise<void> {
    const e = this.entriesSignal().find((x) => x.seq === seq);
    if (!e) return;
    await this.store.put({ ...e, state: 'waiting', message: null, key: newKey(e.kind) });
    await this.load(e.userId);
    void this.flush();
  }

  /** Sends what waits, in order; one run at a time (also across tabs where the browser has Web Locks). */
  flush(): Promise<void> {
    this.flushing ??= this.runLocked().finally(() => (this.flushing = null));
    return this.flushing;
  }

  private async runLocked(): Promise<void> {
    const locks = (navigator as Navigator & { locks?: LockManager }).locks;
    if (locks) await locks.request('jacketwatch-outbox', () => this.sendAll());
    else await this.sendAll();
  }

  private async sendAll(): Promise<void> {
    const userId = this.auth.user()?.id;
    if (!userId) return;
    await this.load(userId); // another tab may have sent some
    const waiting = this.waiting();
    if (!waiting.length) return;
    this.sending.set(true);
    let answered = 0;
    try {
      for (const e of waiting) {
        try {
          await this.send(e);
          await this.store.put({ ...e, state: 'sent', sentAt: Date.now(), file: null }); // the photo is on the server now
          answered++;
          this.net.answered();
          this.retryReason.set(null);
        } catch (err) {
          if (!refusedForGood(err)) {
            if (isNoAnswer(err)) this.net.noAnswer();
            this.retryReason.set(errorText(err));
            break; // keep the order: nothing after it goes before it
          }
          this.net.answered();
          answered++;
          await this.store.put({ ...e, state: 'conflict', message: errorText(err) });
        }
        await this.load(userId);
      }
      await this.prune(userId);
    } finally {
      this.sending.set(false);
      if (answered) this.sentRound.update((n) => n + 1);
    }
  }

  private send(e: OutboxEntry): Promise<unknown> {
    const headers = { 'Idempotency-Key': e.key };
    const base = `/api/work-orders/${e.orderId}`;
    if (e.kind === 'draft') return firstValueFrom(this.http.patch(`${base}/steps/${e.stepId}`, e.body ?? {}, { headers }));
    if (e.kind === 'complete') return firstValueFrom(this.http.post(`${base}/steps/${e.stepId}/complete`, e.body ?? {}, { headers }));
    if (e.kind === 'part') return firstValueFrom(this.http.post(`${base}/parts`, e.body ?? {}, { headers }));
    if (e.kind === 'status') return firstValueFrom(this.http.post(`${base}/transition`, e.body ?? {}, { headers }));
    const form = new FormData();
    if (e.stepId) form.append('stepId', String(e.stepId));
    form.append('file', e.file ?? new Blob(), e.fileName ?? 'photo.jpg');
    return firstValueFrom(this.http.post(`${base}/attachments`, form, { headers }));
  }

  private async prune(userId: number): Promise<void> {
    const old = this.entriesSignal().filter((e) => e.state === 'sent' && e.sentAt !== null && Date.now() - e.sentAt > KEEP_SENT_MS);
    for (const e of old) await this.store.remove(e.seq!);
    if (old.length) await this.load(userId);
  }

  private async load(userId: number | null): Promise<void> {
    if (userId === null) return void this.entriesSignal.set([]);
    try {
      this.entriesSignal.set(await this.store.all(userId));
    } catch {
      this.entriesSignal.set([]); // IndexedDB blocked (private window): nothing kept
    }
  }
}

function newKey(kind: OutboxKind): string {
  const id = typeof crypto.randomUUID === 'function' ? crypto.randomUUID() : `${Date.now().toString(36)}-${Math.random().toString(36).slice(2)}`;
  return `jw-${kind}-${id}`;
}
