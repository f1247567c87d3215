/**
 * A bound on concurrent password-hash work (bcrypt is pure JS here and costs ~100 ms of CPU each).
 * Waiting jobs are served round-robin by client address, so a flood of wrong passwords from one
 * address (or a few) delays a sign-in from another address by at most a few hash times, not by
 * the length of the flood's queue. Addresses whose recent checks failed wait behind the others.
 */
export class HashGate {
  private running = 0;
  private readonly queues = new Map<string, Array<() => void>>();
  /** Addresses with waiting jobs, in serving order. */
  private readonly turn: string[] = [];

  /** Address -> until when it counts as suspect (a check from it failed). */
  private readonly suspect = new Map<string, number>();

  constructor(
    private readonly concurrency = 2,
    private readonly maxWaitingPerKey = 200,
    private readonly suspectMs = 15 * 60_000,
  ) {}

  /** Runs `job` (a password check: true when it matched) when a slot is free; rejects at once when this address already has too many waiting. */
  run(key: string, job: () => Promise<boolean>): Promise<boolean> {
    return new Promise<boolean>((resolve, reject) => {
      const start = () => {
        this.running++;
        job()
          .then((ok) => {
            if (!ok) this.markSuspect(key);
            resolve(ok);
          }, reject)
          .finally(() => {
            this.running--;
            this.next();
          });
      };
      if (this.running < this.concurrency && this.turn.length === 0) return start();
      let q = this.queues.get(key);
      if (!q) {
        this.queues.set(key, (q = []));
        this.turn.push(key);
      }
      if (q.length >= this.maxWaitingPerKey) return reject(new Error('too many sign-ins waiting from this address'));
      q.push(start);
    });
  }

  get waiting(): number {
    let n = 0;
    for (const q of this.queues.values()) n += q.length;
    return n;
  }

  private markSuspect(key: string): void {
    const now = Date.now();
    if (this.suspect.size > 10_000) for (const [k, until] of this.suspect) if (until < now) this.suspect.delete(k);
    this.suspect.set(key, now + this.suspectMs);
  }

  private isSuspect(key: string, now: number): boolean {
    return (this.suspect.get(key) ?? 0) > now;
  }

  private next(): void {
    const now = Date.now();
    while (this.running < this.concurrency && this.turn.length) {
      // the first address in turn without recent failures, else the first in turn
      let at = this.turn.findIndex((k) => !this.isSuspect(k, now));
      if (at < 0) at = 0;
      const key = this.turn.splice(at, 1)[0];
      const q = this.queues.get(key)!;
      const job = q.shift()!;
      if (q.length)
        this.turn.push(key); // back of the line: others go first
      else this.queues.delete(key);
      job();
    }
  }
}

/** One gate per process: HTTP sign-ins and MQTT device logins share the CPU. */
export const hashGate = new HashGate();
