/**
 * Failed logins per key (client address, account) in a sliding window of fixed slices. A key over
 * its limit is refused before any password hashing, so a flood costs almost nothing.
 */
export class FailureThrottle {
  private readonly hits = new Map<string, number[]>();
  private lastSweep = Date.now();

  constructor(
    private readonly limit: number,
    private readonly windowMs: number,
  ) {}

  blocked(key: string, now = Date.now()): boolean {
    return this.recent(key, now).length >= this.limit;
  }

  fail(key: string, now = Date.now()): void {
    const list = this.recent(key, now);
    list.push(now);
    this.hits.set(key, list);
    if (now - this.lastSweep > this.windowMs) this.sweep(now);
  }

  count(key: string, now = Date.now()): number {
    return this.recent(key, now).length;
  }

  private recent(key: string, now: number): number[] {
    const list = this.hits.get(key);
    if (!list) return [];
    const from = now - this.windowMs;
    let i = 0;
    while (i < list.length && list[i] <= from) i++;
    if (i) list.splice(0, i);
    if (!list.length) this.hits.delete(key);
    return list;
  }

  private sweep(now: number): void {
    this.lastSweep = now;
    for (const key of [...this.hits.keys()]) this.recent(key, now);
  }
}
