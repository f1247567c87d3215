import { InjectionToken } from '@angular/core';
import { toZonedInput, wallTimeToUtc } from '../ui/time-format';

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

/** `yyyy-MM-ddTHH:mm` in `zone` (default the browser's), as an <input type="datetime-local"> wants it. */
export function toLocalInput(ms: number, zone?: string | null): string {
  if (zone) return toZonedInput(ms, zone);
  const d = new Date(ms);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

/** Reads an <input type="datetime-local"> value as a time in `zone` (default the browser's); null when empty or invalid. */
export function fromLocalInput(value: string | null | undefined, zone?: string | null): number | null {
  if (!value) return null;
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/.exec(value);
  if (!m) return null;
  if (zone) return wallTimeToUtc(+m[1], +m[2], +m[3], +m[4], +m[5], m[6] ? +m[6] : 0, zone);
  const ms = new Date(+m[1], +m[2] - 1, +m[3], +m[4], +m[5], m[6] ? +m[6] : 0).getTime();
  return Number.isFinite(ms) ? ms : null;
}

/** The query parameters that keep the trend's range and channels in the address (back, reload, shared links). */
export interface TrendQuery {
  range?: string | null;
  from?: string | null;
  to?: string | null;
  channels?: string | null;
}

export const DEFAULT_PRESET: Exclude<RangePreset, 'custom'> = '24h';

/** The range a query stands for; the default (last 24 h) when it says nothing usable. */
export function rangeFromQuery(q: TrendQuery, now: number): TrendRange {
  if (q.range === 'custom' || (!q.range && q.from && q.to)) {
    const parse = (v: string | null | undefined) => (v ? (/^\d+$/.test(v) ? Number(v) : Date.parse(v)) : NaN);
    const r = customRange(parse(q.from), parse(q.to), now);
    if (r) return r;
  }
  const preset = q.range && q.range in PRESET_SPAN_MS ? (q.range as Exclude<RangePreset, 'custom'>) : DEFAULT_PRESET;
  return presetRange(preset, now);
}

/** Query parameters for a range; null removes a parameter (the default range leaves the address clean). */
export function rangeToQuery(range: TrendRange): Record<'range' | 'from' | 'to', string | null> {
  if (range.preset === 'custom') {
    const iso = (ms: number) =>
      new Date(ms)
        .toISOString()
        .replace(/:00\.000Z$/, 'Z')
        .replace(/\.\d{3}Z$/, 'Z');
    return { range: 'custom', from: iso(range.from), to: iso(range.to) };
  }
  return { range: range.preset === DEFAULT_PRESET ? null : range.preset, from: null, to: null };
}

/** Same window kind: a live preset is the same whatever the clock says; a custom window by its bounds. */
export function sameRange(a: TrendRange, b: TrendRange): boolean {
  if (a.preset !== b.preset) return false;
  return a.preset !== 'custom' || (Math.abs(a.from - b.from) < 1000 && Math.abs(a.to - b.to) < 1000);
}
