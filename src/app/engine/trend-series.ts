import { CHANNELS, ChannelKey, RUNNING_RPM } from '../../../shared/channels';
import { UNIT_SYMBOL } from '../../../shared/units';
import { UnitPreferences, convertStored, quantityOf } from '../ui/unit-format';

/** One bucket of GET /api/engines/:id/readings, in stored (SI) units. */
export interface Bucket {
  t: number;
  min: number;
  max: number;
  mean: number;
  count: number;
}

/** One live value to add to a trend, in stored units. */
export interface LiveSample {
  t: number;
  value: number;
}

export interface AppendOptions {
  /** Points older than this are dropped: the window's start. */
  from: number;
  /** Never more points than this (the chart's width in pixels is a good choice). */
  maxPoints: number;
  /** Width of one bucket; a sample within the last bucket's width is folded into it. */
  bucketMs: number;
}

/**
 * Adds live samples to the loaded buckets, keeping the series bounded: a sample inside the newest
 * bucket's width updates that bucket, otherwise it starts a new one; then points before `from`
 * and any beyond `maxPoints` (the oldest) are dropped. Returns a new array; the input is not changed.
 */
export function appendLive(buckets: readonly Bucket[], samples: readonly LiveSample[], opts: AppendOptions): Bucket[] {
  const out = buckets.slice();
  const width = Math.max(1, opts.bucketMs);
  for (const s of samples) {
    if (!Number.isFinite(s.value) || !Number.isFinite(s.t)) continue;
    const last = out[out.length - 1];
    if (last && s.t < last.t) continue; // late arrival: the loaded history already covers it
    if (last && s.t < last.t + width) {
      const count = last.count + 1;
      out[out.length - 1] = {
        t: last.t,
        min: Math.min(last.min, s.value),
        max: Math.max(last.max, s.value),
        mean: last.mean + (s.value - last.mean) / count,
        count,
      };
    } else {
      out.push({ t: s.t, min: s.value, max: s.value, mean: s.value, count: 1 });
    }
  }
  let start = 0;
  while (start < out.length && out[start].t < opts.from) start++;
  const max = Math.max(1, Math.floor(opts.maxPoints));
  if (out.length - start > max) start = out.length - max;
  return start > 0 ? out.slice(start) : out;
}

/** Bucket width the server used for a window and a number of points (raw under 6 h, whole minutes beyond). */
export function bucketWidth(from: number, to: number, points: number): number {
  const span = Math.max(1, to - from);
  if (span <= 6 * 3600_000) return Math.max(1, Math.ceil(span / points));
  return Math.max(1, Math.ceil(span / 60_000 / points)) * 60_000;
}

export interface ChartPoint {
  x: number;
  y: number;
}
export interface RangePoint {
  x: number;
  y: [number, number];
}
export interface ChannelSeries {
  channel: ChannelKey;
  /** Display unit symbol, e.g. "°F". */
  unit: string;
  mean: ChartPoint[];
  range: RangePoint[];
}

const round = (v: number) => Math.round(v * 1000) / 1000;

/** Buckets as chart points in the user's units: the mean as a line, min-max as a band. */
export function toChannelSeries(channel: ChannelKey, buckets: readonly Bucket[], prefs: UnitPreferences): ChannelSeries {
  const quantity = quantityOf(channel);
  const conv = (v: number) => round(convertStored(v, quantity, prefs).value);
  return {
    channel,
    unit: UNIT_SYMBOL[convertStored(0, quantity, prefs).unit],
    mean: buckets.map((b) => ({ x: b.t, y: conv(b.mean) })),
    range: buckets.map((b) => ({ x: b.t, y: [conv(b.min), conv(b.max)] })),
  };
}

export interface RunChange {
  t: number;
  kind: 'start' | 'stop';
}

/**
 * Where the engine started and stopped, from engine-speed buckets: a start at the first bucket whose mean
 * speed is above RUNNING_RPM after one at or below it, a stop the other way round. The mean decides, so a
 * bucket that holds both states counts as the one it mostly held.
 */
export function runChanges(speed: readonly Bucket[]): RunChange[] {
  const out: RunChange[] = [];
  let running: boolean | null = null;
  for (const b of speed) {
    const now = b.mean > RUNNING_RPM;
    if (running !== null && now !== running) out.push({ t: b.t, kind: now ? 'start' : 'stop' });
    running = now;
  }
  return out;
}

/** Label with unit for an axis or a legend: "Coolant temperature (°C)". */
export function channelTitle(channel: ChannelKey, unit: string): string {
  return `${CHANNELS[channel].label} (${unit})`;
}
