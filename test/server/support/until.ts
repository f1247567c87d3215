/** Polls `fn` until `ok` holds (a condition wait, never a fixed sleep); fails naming what it waited for. */
export async function until<T>(what: string, fn: () => Promise<T>, ok: (v: T) => boolean, ms = 10_000, everyMs = 100): Promise<T> {
  const end = Date.now() + ms;
  let v = await fn();
  while (!ok(v)) {
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}; last value ${JSON.stringify(v)}`);
    await new Promise((r) => setTimeout(r, everyMs));
    v = await fn();
  }
  return v;
}
