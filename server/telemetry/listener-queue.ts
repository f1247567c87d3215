/**
 * Readings listeners that need not run in their message's own turn (the rule engine, the opening-check history,
 * the run-hour counter): their batches wait here in arrival order and are handed on in slices of at most
 * `sliceMs` per event-loop turn. The message's own turn then does only what the live push needs (parse, buffer,
 * live state, the push itself), so at 2,000 engines x 1 Hz a reading is not held behind the rule engine's work for
 * the readings ahead of it (that work was about three quarters of the ingest's per-message time, measured with a
 * CPU profile under `BENCH_PHASE=push`).
 *
 * Bounded: once `bound` readings wait, `full` is true and the ingest takes no more messages until it drains (their
 * MQTT callbacks wait, so TCP pushes back on the devices, as with the ingest's own queue). Listeners see every batch
 * once, in the order accepted; a listener's failure is logged and does not stop the others.
 */
import type { Logger } from '../logger';
import type { AcceptedReading } from './types';

type Listener = (readings: AcceptedReading[]) => void;

/** A batch for the listeners, or an event that must reach them after the batches before it (a gateway's death). */
type Item = AcceptedReading[] | (() => void);

export class ListenerQueue {
  private batches: Item[] = [];
  private head = 0;
  private waitingReadings = 0;
  private scheduled = false;

  constructor(
    private readonly listeners: readonly Listener[],
    private readonly log: Logger,
    private readonly sliceMs = 10,
    readonly bound = 50_000,
  ) {}

  /** Readings waiting for the listeners. */
  get backlog(): number {
    return this.waitingReadings;
  }

  get full(): boolean {
    return this.waitingReadings >= this.bound;
  }

  push(batch: AcceptedReading[]): void {
    this.batches.push(batch);
    this.waitingReadings += batch.length;
    this.schedule();
  }

  /** Runs `event` once the listeners have had every batch pushed before it. */
  then(event: () => void): void {
    this.batches.push(event);
    this.schedule();
  }

  /** Hands everything waiting to the listeners now (on stop). */
  drainNow(): void {
    this.run(Infinity);
  }

  private schedule(): void {
    if (this.scheduled) return;
    this.scheduled = true;
    setImmediate(() => {
      this.scheduled = false;
      this.run(this.sliceMs);
    });
  }

  private run(budgetMs: number): void {
    const started = performance.now();
    while (this.head < this.batches.length && performance.now() - started < budgetMs) {
      const item = this.batches[this.head];
      this.batches[this.head++] = undefined as unknown as Item;
      if (typeof item === 'function') {
        try {
          item();
        } catch (err) {
          this.log.error('telemetry: event after readings failed', err);
        }
        continue;
      }
      this.waitingReadings -= item.length;
      for (const l of this.listeners) {
        try {
          l(item);
        } catch (err) {
          this.log.error('telemetry: readings listener failed', err);
        }
      }
    }
    if (this.head < this.batches.length) {
      // compact now and then, not per batch
      if (this.head > 4096) {
        this.batches = this.batches.slice(this.head);
        this.head = 0;
      }
      this.schedule();
      return;
    }
    this.batches = [];
    this.head = 0;
  }
}
