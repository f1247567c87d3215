import type { IngestCounters } from './types';

/** Running ingest figures for /api/health and /api/admin/ingest. Plain numbers: cheap on the hot path. */
export class Counters {
  messages = 0;
  received = 0;
  stored = 0;
  outOfRange = 0;
  batches = 0;
  rejected: Record<string, number> = {};
  private readonly startedAt = new Date().toISOString();
  private readonly window: number[] = [];
  private last = 0;

  constructor(private readonly windowSize = 200) {}

  reject(reason: string, n = 1): void {
    this.rejected[reason] = (this.rejected[reason] ?? 0) + n;
  }

  /** One flush written: its rows and how long the write took. */
  batch(rows: number, ms: number): void {
    this.batches++;
    this.stored += rows;
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
      rejected: { ...this.rejected },
      outOfRange: this.outOfRange,
      buffered,
      batches: this.batches,
      batchLatencyMs: { last: round(this.last), p50: round(at(0.5)), p95: round(at(0.95)), max: round(sorted.length ? sorted[sorted.length - 1] : 0) },
      startedAt: this.startedAt,
    };
  }
}

const round = (n: number) => Math.round(n * 10) / 10;
