import { InjectionToken } from '@angular/core';

/** The spans the range picker offers; 'custom' is a from/to the user typed. */
export type RangePreset = '1h' | '24h' | '7d' | '30d' | 'custom';

/** A time window of the trend, ms since epoch, [from, to). `live` when it ends at "now" and follows the clock. */
export interface TrendRange {
  preset: RangePreset;
  from: number;
  to: number;
  live: boolean;
}

const HOUR_MS = 3600_000;
export const PRESET_SPAN_MS: Record<Exclude<RangePreset, 'custom'>, number> = {
  '1h': HOUR_MS,
  '24h': 24 * HOUR_MS,
  '7d': 7 * 24 * HOUR_MS,
  '30d': 30 * 24 * HOUR_MS,
};

export const PRESET_LABEL: Record<RangePreset, string> = {
  '1h': 'Last hour',
  '24h': 'Last 24 h',
  '7d': 'Last 7 days',
  '30d': 'Last 30 days',
  custom: 'From–to',
};

/** Where the range picker and the trend read the time; tests give a fixed clock. */
export const TREND_NOW = new InjectionToken<() => number>('TREND_NOW', { providedIn: 'root', factory: () => () => Date.now() });

/** The window a preset stands for at `now`: it ends at now and follows it. */
export function presetRange(preset: Exclude<RangePreset, 'custom'>, now: number): TrendRange {
  return { preset, from: now - PRESET_SPAN_MS[preset], to: now, live: true };
}

/** A fixed window; it is live only if it reaches now. Null when the order is wrong or a bound is missing. */
export function customRange(from: number | null, to: number | null, now: number): TrendRange | null {
  if (from === null || to === null || !Number.isFinite(from) || !Number.isFinite(to) || from >= to) return null;
  const end = Math.min(to, now);
  if (from >= end) return null;
  return { preset: 'custom', from, to: end, live: to >= now };
}

/** The same kind of window again at a later now (a live preset moves on; a fixed window stays). */
export function refreshRange(range: TrendRange, now: number): TrendRange {
  return range.preset === 'custom' ? range : presetRange(range.preset, now);
}

/** `yyyy-MM-ddTHH:mm` in the browser's time zone, as an <input type="datetime-local"> wants it. */
export function toLocalInput(ms: number): string {
  const d = new Date(ms);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

/** Reads an <input type="datetime-local"> value as local time; null when empty or invalid. */
export function fromLocalInput(value: string | null | undefined): number | null {
  if (!value) return null;
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value);
  if (!m) return null;
  const ms = new Date(+m[1], +m[2] - 1, +m[3], +m[4], +m[5], m[6] ? +m[6] : 0).getTime();
  return Number.isFinite(ms) ? ms : null;
}
