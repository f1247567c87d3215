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

/**
 * Readings in columns (typed arrays), not one object per reading. A flood keeps tens of thousands of
 * readings waiting for the writer for a few hundred milliseconds: as objects they outlived the young
 * generation and were promoted to the old one, which then grew through the whole flood until a full
 * collection (the server's RSS climbed by half in 15 s). Columns are a handful of objects whatever the count.
 */
export class ReadingBlock {
  engine: Int32Array;
  channel: Uint8Array;
  ts: Float64Array;
  value: Float64Array;
  quality: Uint8Array;
  length = 0;

  constructor(capacity = 1024) {
    this.engine = new Int32Array(capacity);
    this.channel = new Uint8Array(capacity);
    this.ts = new Float64Array(capacity);
    this.value = new Float64Array(capacity);
    this.quality = new Uint8Array(capacity);
  }

  get capacity(): number {
    return this.ts.length;
  }

  push(engineId: number, channel: number, ts: number, value: number, quality: number): void {
    if (this.length === this.ts.length) this.resize(Math.max(1024, this.length * 2));
    const i = this.length++;
    this.engine[i] = engineId;
    this.channel[i] = channel;
    this.ts[i] = ts;
    this.value[i] = value;
    this.quality[i] = quality;
  }

  /** Appends rows [from, to) of `other`. */
  append(other: ReadingBlock, from = 0, to = other.length): void {
    const n = to - from;
    if (this.length + n > this.ts.length) this.resize(Math.max(1024, (this.length + n) * 2));
    const at = this.length;
    this.engine.set(other.engine.subarray(from, to), at);
    this.channel.set(other.channel.subarray(from, to), at);
    this.ts.set(other.ts.subarray(from, to), at);
    this.value.set(other.value.subarray(from, to), at);
    this.quality.set(other.quality.subarray(from, to), at);
    this.length += n;
  }

  /** Drops the first n rows (moves the rest to the front). */
  dropFront(n: number): void {
    this.engine.copyWithin(0, n, this.length);
    this.channel.copyWithin(0, n, this.length);
    this.ts.copyWithin(0, n, this.length);
    this.value.copyWithin(0, n, this.length);
    this.quality.copyWithin(0, n, this.length);
    this.length -= n;
  }

  private resize(capacity: number): void {
    const grow = <T extends Int32Array | Uint8Array | Float64Array>(a: T, make: (n: number) => T): T => {
      const b = make(capacity);
      b.set(a.subarray(0, this.length) as never);
      return b;
    };
    this.engine = grow(this.engine, (n) => new Int32Array(n));
    this.channel = grow(this.channel, (n) => new Uint8Array(n));
    this.ts = grow(this.ts, (n) => new Float64Array(n));
    this.value = grow(this.value, (n) => new Float64Array(n));
    this.quality = grow(this.quality, (n) => new Uint8Array(n));
  }
}

export class IngestBuffer {
  private store = new ReadingBlock(16_384);
  private head = 0;
  private waiters: Array<() => void> = [];
  /** Rows ever pushed / ever committed: the positions acks wait for. */
  private pushed = 0;
  private committed = 0;
  private acks: Array<{ at: number; ack: () => void }> = [];
  private ackHead = 0;

  constructor(readonly highWater = 20_000) {}

  get size(): number {
    return this.store.length - this.head;
  }

  get waiting(): number {
    return this.waiters.length;
  }

  /** Acks waiting for a commit. */
  get pendingAcks(): number {
    return this.acks.length - this.ackHead;
  }

  push(engineId: number, channel: number, ts: number, value: number, quality: 0 | 1): void {
    this.store.push(engineId, channel, ts, value, quality);
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
      try {
        ack();
      } catch {
        /* a caller's failure must not stop the others */
      }
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

  /**
   * Takes up to `max` of the oldest readings (FIFO), copied into `into` (the writer's own block, reused
   * for every flush, so a flood does not leave a trail of dead column arrays for the full collector).
   */
  take(max: number, into: ReadingBlock = new ReadingBlock(Math.max(1, max))): ReadingBlock {
    const n = Math.min(max, this.size);
    into.length = 0;
    into.append(this.store, this.head, this.head + n);
    const out = into;
    this.head += n;
    // move the rest to the front now and then rather than per take
    if (this.head === this.store.length) {
      // empty: start over, and give back what a backlog grew
      if (this.store.capacity > 65_536) this.store = new ReadingBlock(16_384);
      else this.store.length = 0;
      this.head = 0;
    } else if (this.head > this.store.capacity / 2) {
      this.store.dropFront(this.head);
      this.head = 0;
    }
    return out;
  }

  /** Puts rows back at the front after a failed write, so they go out first next time. */
  unshift(rows: ReadingBlock): void {
    const next = new ReadingBlock(Math.max(16_384, rows.length + this.size));
    next.append(rows);
    next.append(this.store, this.head, this.store.length);
    this.store = next;
    this.head = 0;
  }

  /** Releases held callers while there is room; called after every flush. */
  release(): void {
    while (this.waiters.length && this.size < this.highWater) {
      const next = this.waiters.shift()!;
      try {
        next();
      } catch {
        /* a caller's failure must not stop the others */
      }
    }
  }

  /** Releases everyone regardless of room (used on stop, after the final flush has taken their rows). */
  releaseAll(): void {
    const all = this.waiters;
    this.waiters = [];
    for (const next of all) {
      try {
        next();
      } catch {
        /* ignore */
      }
    }
  }
}
