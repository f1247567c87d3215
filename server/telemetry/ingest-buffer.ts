/**
 * Bounded ingest buffer. Accepted readings are never dropped: when more than `highWater` wait for the
 * writer, callers are told to wait (their MQTT publish callbacks are held back), which stops aedes
 * reading those sockets and so pushes back on the devices over TCP. Memory stays flat under a flood.
 *
 * Acknowledge after commit: every message registers its ack after pushing its rows (`afterCommit`).
 * Rows leave in FIFO order, so an ack is due once the writer has committed as many rows as had been
 * pushed when it was registered: one flush (one transaction) releases every ack it covers (group commit).
 */
export interface BufferedReading {
  engineId: number;
  channel: number;
  ts: number;
  value: number;
  quality: 0 | 1;
}

export class IngestBuffer {
  private rows: BufferedReading[] = [];
  private head = 0;
  private waiters: Array<() => void> = [];
  /** Rows ever pushed / ever committed: the positions acks wait for. */
  private pushed = 0;
  private committed = 0;
  private acks: Array<{ at: number; ack: () => void }> = [];
  private ackHead = 0;

  constructor(readonly highWater = 20_000) {}

  get size(): number {
    return this.rows.length - this.head;
  }

  get waiting(): number {
    return this.waiters.length;
  }

  /** Acks waiting for a commit. */
  get pendingAcks(): number {
    return this.acks.length - this.ackHead;
  }

  push(row: BufferedReading): void {
    this.rows.push(row);
    this.pushed++;
  }

  /** Runs `ack` once every row pushed so far is committed (at once when there is none in flight). */
  afterCommit(ack: () => void): void {
    if (this.committed >= this.pushed) ack();
    else this.acks.push({ at: this.pushed, ack });
  }

  /** The writer committed the `n` oldest taken rows: releases the acks they complete. */
  committedRows(n: number): void {
    this.committed += n;
    while (this.ackHead < this.acks.length && this.acks[this.ackHead].at <= this.committed) {
      const { ack } = this.acks[this.ackHead];
      this.acks[this.ackHead++] = undefined as unknown as { at: number; ack: () => void };
      try { ack(); } catch { /* a caller's failure must not stop the others */ }
    }
    if (this.ackHead > 10_000 || this.ackHead === this.acks.length) {
      this.acks = this.acks.slice(this.ackHead);
      this.ackHead = 0;
    }
  }

  /** Runs `ready` now when there is room, else once the writer has drained below the high-water mark. */
  whenRoom(ready: () => void): void {
    if (this.size < this.highWater) ready();
    else this.waiters.push(ready);
  }

  /** Takes up to `max` of the oldest readings (FIFO). */
  take(max: number): BufferedReading[] {
    const n = Math.min(max, this.size);
    const out = this.rows.slice(this.head, this.head + n);
    this.head += n;
    // compact now and then rather than shifting per take
    if (this.head > 50_000 || this.head === this.rows.length) {
      this.rows = this.rows.slice(this.head);
      this.head = 0;
    }
    return out;
  }

  /** Puts rows back at the front after a failed write, so they go out first next time. */
  unshift(rows: BufferedReading[]): void {
    this.rows = rows.concat(this.rows.slice(this.head));
    this.head = 0;
  }

  /** Releases held callers while there is room; called after every flush. */
  release(): void {
    while (this.waiters.length && this.size < this.highWater) {
      const next = this.waiters.shift()!;
      try { next(); } catch { /* a caller's failure must not stop the others */ }
    }
  }

  /** Releases everyone regardless of room (used on stop, after the final flush has taken their rows). */
  releaseAll(): void {
    const all = this.waiters;
    this.waiters = [];
    for (const next of all) { try { next(); } catch { /* ignore */ } }
  }
}
