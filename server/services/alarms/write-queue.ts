/**
 * The alarm write queue: every change to alarms runs one after another, in the order asked, so two
 * changes of one alarm never interleave. A failed change does not stop the ones queued after it.
 */
export class WriteQueue {
  private tail: Promise<unknown> = Promise.resolve();

  /** Run `fn` after every change queued before it. */
  run<T>(fn: () => Promise<T>): Promise<T> {
    const p = this.tail.then(fn, fn);
    this.tail = p.catch(() => undefined);
    return p;
  }

  /** Resolves once every change queued so far has run (tests, shutdown). */
  idle(): Promise<void> {
    return this.run(async () => undefined);
  }
}
