/**
 * A bound on concurrent password-hash work (bcrypt is pure JS here and costs ~100 ms of CPU each).
 * Waiting jobs are served round-robin by client address, so a flood of wrong passwords from one
 * address (or a few) delays a sign-in from another address by at most a few hash times, not by
 * the length of the flood's queue. Addresses whose recent checks failed wait behind the others.
 * What one address may have waiting is bounded per account (`who`), not per address: many devices
 * behind one gateway's NAT address reconnecting at once all wait their turn; one account cannot
 * pile up checks.
 */
export class HashGate {
  private running = 0;
  private readonly queues = new Map<string, Array<() => void>>();
  /** `key\0who` -> checks of that account waiting from that address. */
  private readonly waitingOf = new Map<string, number>();
  /** Addresses with waiting jobs, in serving order. */
  private readonly turn: string[] = [];

  /** Address -> until when it counts as suspect (a check from it failed). */
  private readonly suspect = new Map<string, number>();

  constructor(
    private readonly concurrency = 2,
    private readonly maxWaitingPerAccount = 4,
    private readonly suspectMs = 15 * 60_000,
    /** A bound on memory only: far above any real gateway's number of devices. */
    private readonly maxWaitingPerKey = 20_000,
  ) {}

  /**
   * Runs `job` (a password check of account `who`: true when it matched) when a slot is free; rejects
   * at once when this address already has too many checks of that account waiting.
   */
  run(key: string, job: () => Promise<boolean>, who = ''): Promise<boolean> {
    return new Promise<boolean>((resolve, reject) => {
      const slot = `${key}\0${who}`;
      const start = () => {
        const left = (this.waitingOf.get(slot) ?? 1) - 1;
        if (left > 0) this.waitingOf.set(slot, left);
        else this.waitingOf.delete(slot);
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
      if (this.running < this.concurrency && this.turn.length === 0) {
        this.waitingOf.set(slot, (this.waitingOf.get(slot) ?? 0) + 1);
        return start();
      }
      const q = this.queues.get(key);
      const mine = this.waitingOf.get(slot) ?? 0;
      if (mine >= this.maxWaitingPerAccount || (q?.length ?? 0) >= this.maxWaitingPerKey) {
        return reject(new Error('too many sign-ins waiting from this address'));
      }
      this.waitingOf.set(slot, mine + 1);
      if (q) q.push(start);
      else {
        this.queues.set(key, [start]);
        this.turn.push(key);
      }
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
