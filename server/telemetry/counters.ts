import { monitorEventLoopDelay, type IntervalHistogram } from 'node:perf_hooks';
import type { IngestCounters, LoopDelay } from './types';

/** Running ingest figures for /api/health and /api/admin/ingest. Plain numbers: cheap on the hot path. */
export class Counters {
  messages = 0;
  received = 0;
  stored = 0;
  /** Readings already in the store (a QoS 1 redelivery, a repeated sample): skipped, not stored twice. */
  duplicate = 0;
  /** Connections closed because a packet declared more than the broker's packet limit. */
  oversizePacketsClosed = 0;
  outOfRange = 0;
  batches = 0;
  rejected: Record<string, number> = {};
  private readonly startedAt = new Date().toISOString();
  private readonly window: number[] = [];
  private last = 0;

  private loop: IntervalHistogram | null = null;
  private loopTimer: NodeJS.Timeout | null = null;
  private recentLoop: LoopDelay = { p50: 0, p99: 0, max: 0 };
  private worstLoopMs = 0;

  constructor(private readonly windowSize = 200) {}

  /**
   * Event-loop delay of this process (perf_hooks), in windows of `windowMs`: a flush or a payload storm that
   * blocks the loop shows here, and it is what HTTP and socket.io clients feel.
   */
  watchEventLoop(windowMs = 2000): void {
    if (this.loop) return;
    const h = monitorEventLoopDelay({ resolution: 10 });
    h.enable();
    this.loop = h;
    this.loopTimer = setInterval(() => {
      this.recentLoop = { p50: round(h.percentile(50) / 1e6), p99: round(h.percentile(99) / 1e6), max: round(h.max / 1e6) };
      if (this.recentLoop.max > this.worstLoopMs) this.worstLoopMs = this.recentLoop.max;
      h.reset();
    }, windowMs);
    this.loopTimer.unref();
  }

  stopWatching(): void {
    if (this.loopTimer) clearInterval(this.loopTimer);
    this.loop?.disable();
    this.loop = null;
  }

  reject(reason: string, n = 1): void {
    this.rejected[reason] = (this.rejected[reason] ?? 0) + n;
  }

  /** One flush committed: rows inserted, rows skipped as already stored, and how long the write took. */
  batch(rows: number, duplicates: number, ms: number): void {
    this.batches++;
    this.stored += rows;
    this.duplicate += duplicates;
    this.last = ms;
    this.window.push(ms);
    if (this.window.length > this.windowSize) this.window.shift();
  }

  snapshot(buffered: number): IngestCounters & { messages: number } {
    const sorted = [...this.window].sort((a, b) => a - b);
    const at = (q: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] : 0);
    return {
      messages: this.messages,
      received: this.received,
      stored: this.stored,
      duplicate: this.duplicate,
      oversizePacketsClosed: this.oversizePacketsClosed,
      rejected: { ...this.rejected },
      outOfRange: this.outOfRange,
      buffered,
      batches: this.batches,
      batchLatencyMs: { last: round(this.last), p50: round(at(0.5)), p95: round(at(0.95)), max: round(sorted.length ? sorted[sorted.length - 1] : 0) },
      eventLoopDelayMs: { ...this.recentLoop, worst: this.worstLoopMs },
      startedAt: this.startedAt,
    };
  }
}

const round = (n: number) => Math.round(n * 10) / 10;
