import { DestroyRef, Injectable, inject } from '@angular/core';
import { formatInZone } from '../ui/time-format';
import { LiveService } from './live.service';

/**
 * When a live value stops being "now". A value is stale once it is older than STALE_FACTOR times the engine's
 * usual reporting interval, and never sooner than STALE_FLOOR_MS (so a value a few seconds old after a brief
 * hiccup is not flagged). Factor and floor are common practice for polled telemetry, not a published figure.
 */
export const STALE_FACTOR = 3;
export const STALE_FLOOR_MS = 30_000;
/** Assumed interval until enough live messages have arrived to measure it (common practice for gateways). */
export const DEFAULT_INTERVAL_MS = 10_000;
/** Gaps kept per engine to find its usual interval. */
const GAPS_KEPT = 15;

/** The median of the recent gaps between arrivals; null with fewer than 3 gaps. */
export function usualInterval(gaps: readonly number[]): number | null {
  const ok = gaps.filter((g) => Number.isFinite(g) && g > 0);
  if (ok.length < 3) return null;
  const sorted = [...ok].sort((a, b) => a - b);
  const mid = sorted.length >> 1;
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** How old a value may be and still count as current. */
export function staleAfterMs(intervalMs: number | null): number {
  return Math.max(STALE_FLOOR_MS, STALE_FACTOR * (intervalMs ?? DEFAULT_INTERVAL_MS));
}

export function isStale(at: number | null, now: number, intervalMs: number | null): boolean {
  return at !== null && now - at > staleAfterMs(intervalMs);
}

/** "45 s", "12 min", "3 h", "2 d". */
export function ageText(ms: number): string {
  const s = Math.max(0, Math.round(ms / 1000));
  if (s < 90) return `${s} s`;
  const min = Math.round(s / 60);
  if (min < 90) return `${min} min`;
  const h = Math.round(min / 60);
  if (h < 48) return `${h} h`;
  return `${Math.round(h / 24)} d`;
}

/**
 * "last 11:15 · 12 min ago" (with the date when it is not today in that zone) for a stale value.
 */
export function staleText(at: number, now: number, zone: string | null | undefined): string {
  const sameDay = formatInZone(at, zone, 'date') === formatInZone(now, zone, 'date');
  const when = formatInZone(at, zone, sameDay ? 'time' : 'datetime');
  return `last ${when} · ${ageText(now - at)} ago`;
}

/**
 * Learns each engine's usual reporting interval from the gaps between live messages (by their sample time),
 * so staleness follows the engine's own cadence: a gateway that reports each minute is not stale at 30 s.
 */
@Injectable({ providedIn: 'root' })
export class ReadingCadence {
  private readonly last = new Map<number, number>();
  private readonly gaps = new Map<number, number[]>();

  constructor() {
    const sub = inject(LiveService).readings$.subscribe((msg) => {
      const t = typeof msg.ts === 'number' ? msg.ts : Date.parse(msg.ts);
      if (Number.isFinite(t)) this.note(msg.engineId, t);
    });
    inject(DestroyRef).onDestroy(() => sub.unsubscribe());
  }

  note(engineId: number, t: number): void {
    const prev = this.last.get(engineId);
    if (prev !== undefined && t <= prev) return; // late or repeated data says nothing about the cadence
    this.last.set(engineId, t);
    if (prev === undefined) return;
    const list = this.gaps.get(engineId) ?? [];
    list.push(t - prev);
    if (list.length > GAPS_KEPT) list.shift();
    this.gaps.set(engineId, list);
  }

  /** The engine's usual interval in ms, or null while unknown (then the default applies). */
  intervalFor(engineId: number): number | null {
    return usualInterval(this.gaps.get(engineId) ?? []);
  }
}
