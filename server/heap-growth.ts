import v8 from 'node:v8';

/**
 * How far V8 lets the old generation grow past what the last full collection kept, in per cent
 * (HEAP_GROWING_PERCENT, default 50; 0 leaves V8's own choice). Under an ingest flood the rule engine's
 * per-reading states and the messages waiting for their commit live a few hundred milliseconds: long
 * enough to be promoted, then garbage. With its own choice V8 lets such a heap grow to several times its
 * live size before a full collection (measured: old generation 40 -> 120 MB, RSS +25-56 % during a 15 s
 * flood); bounded here, RSS stays near the live size, for some more full collections.
 * V8's --heap-growing-percent, applied at start (it is read each time V8 sets the next limit).
 */
export function boundHeapGrowth(pct: number): void {
  if (pct > 0) v8.setFlagsFromString(`--heap-growing-percent=${pct}`);
}
