/**
 * A bound on concurrent password-hash work (bcrypt is pure JS here and costs ~100 ms of CPU each).
 * Waiting jobs are served round-robin by client address, so a flood of wrong passwords from one
 * address (or a few) delays a sign-in from another address by at most a few hash times, not by
 * the length of the flood's queue.
 */
export class HashGate {
  private running = 0;
  private readonly queues = new Map<string, Array<() => void>>();
  /** Addresses with waiting jobs, in serving order. */
  private readonly turn: string[] = [];

  constructor(private readonly concurrency = 2, private readonly maxWaitingPerKey = 200) {}

  /** Runs `job` when a slot is free; rejects at once when this address already has too many waiting. */
  run<T>(key: string, job: () => Promise<T>): Promise<T> {
    return new Promise<T>((resolve, reject) => {
      const start = () => {
        this.running++;
        job().then(resolve, reject).finally(() => {
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

  private next(): void {
    while (this.running < this.concurrency && this.turn.length) {
      const key = this.turn.shift()!;
      const q = this.queues.get(key)!;
      const job = q.shift()!;
      if (q.length) this.turn.push(key); // back of the line: others go first
      else this.queues.delete(key);
      job();
    }
  }
}

/** One gate per process: HTTP sign-ins and MQTT device logins share the CPU. */
export const hashGate = new HashGate();
