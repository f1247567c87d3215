/**
 * A double-ended queue of (ts, value) points in a ring buffer, for the sliding minimum and maximum of a
 * rule's window (monotonic queues: push at the back, drop from either end). Every operation is O(1)
 * (amortised when the buffer grows), and nothing is copied per reading.
 *
 * Plain data (two number arrays and two integers), so a rule state holding it survives a JSON round
 * trip. `length` is the number of points held; the capacity is the arrays' length, a power of two.
 * Index `i` from the front lives at `(head + i) & (capacity - 1)`.
 */
export interface PointDeque {
  ts: number[];
  value: number[];
  /** Array index of the front point. */
  head: number;
  /** Points held. */
  length: number;
}

const MIN_CAPACITY = 4;

export function createPointDeque(capacity = MIN_CAPACITY): PointDeque {
  let cap = MIN_CAPACITY;
  while (cap < capacity) cap *= 2;
  return { ts: new Array<number>(cap).fill(0), value: new Array<number>(cap).fill(0), head: 0, length: 0 };
}

/** Doubles the capacity, laying the points out from index 0 in order. */
function grow(q: PointDeque): void {
  const cap = q.ts.length;
  const mask = cap - 1;
  const ts = new Array<number>(cap * 2).fill(0);
  const value = new Array<number>(cap * 2).fill(0);
  for (let i = 0; i < q.length; i++) {
    const k = (q.head + i) & mask;
    ts[i] = q.ts[k];
    value[i] = q.value[k];
  }
  q.ts = ts;
  q.value = value;
  q.head = 0;
}

export function pushBack(q: PointDeque, ts: number, value: number): void {
  if (q.length === q.ts.length) grow(q);
  const k = (q.head + q.length) & (q.ts.length - 1);
  q.ts[k] = ts;
  q.value[k] = value;
  q.length++;
}

/** Removes the newest point (no-op when empty). */
export function popBack(q: PointDeque): void {
  if (q.length > 0) q.length--;
}

/** Removes the oldest point and returns its time (undefined when empty). */
export function popFront(q: PointDeque): number | undefined {
  if (q.length === 0) return undefined;
  const t = q.ts[q.head];
  q.head = (q.head + 1) & (q.ts.length - 1);
  q.length--;
  return t;
}

/** Time and value of the i-th point from the front (0 = oldest); callers keep 0 <= i < length. */
export function tsAt(q: PointDeque, i: number): number {
  return q.ts[(q.head + i) & (q.ts.length - 1)];
}
export function valueAt(q: PointDeque, i: number): number {
  return q.value[(q.head + i) & (q.ts.length - 1)];
}

/** The points front to back, as objects (for tests and inspection; not on the hot path). */
export function dequePoints(q: PointDeque): { ts: number; value: number }[] {
  return Array.from({ length: q.length }, (_, i) => ({ ts: tsAt(q, i), value: valueAt(q, i) }));
}
