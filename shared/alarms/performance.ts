/**
 * Alarm system performance figures in the spirit of ISA-18.2 (alarm performance monitoring):
 * average annunciated alarms per day and per 10 minutes, the busiest 10-minute periods,
 * the most frequent alarms, chattering alarms, standing alarms and time to acknowledge.
 *
 * Chattering: common practice, not a figure of the standard: an alarm that activates
 * `chatterCount` (3) or more times within `chatterWindowMs` (1 minute). ISA-18.2 defines
 * chattering only as an alarm that repeatedly changes between the alarm and normal states in
 * a short time.
 * Standing: active longer than `standingMs` (24 h), the usual working threshold (common practice).
 */
import { median } from '../rules/rule-types';

export interface AlarmActivation {
  /** Which alarm (rule and engine), e.g. 'engine:7/coolant_temp_high'. */
  key: string;
  activatedAt: number;
  acknowledgedAt?: number | null;
  clearedAt?: number | null;
}

export interface PerformanceOptions {
  from: number;
  to: number;
  chatterWindowMs?: number;
  chatterCount?: number;
  standingMs?: number;
  topN?: number;
}

export interface PerformanceReport {
  from: number;
  to: number;
  total: number;
  days: number;
  perDay: number;
  per10Min: number;
  /** Highest count in any fixed 10-minute period (aligned to `from`). */
  max10Min: number;
  /** Share (0..1) of fixed 10-minute periods with more than 10 alarms. */
  share10MinOver10: number;
  mostFrequent: { key: string; count: number; share: number }[];
  chattering: { key: string; bursts: number; maxInWindow: number }[];
  /** The chattering test applied: this many activations within this window. */
  chatter: { count: number; windowMs: number };
  standing: { key: string; activatedAt: number; activeMs: number }[];
  acknowledge: { count: number; meanMs: number | null; medianMs: number | null; unacknowledged: number };
}

const TEN_MIN = 10 * 60_000;
const DAY = 24 * 3_600_000;

export function alarmPerformance(activations: readonly AlarmActivation[], opt: PerformanceOptions): PerformanceReport {
  const chatterWindow = opt.chatterWindowMs ?? 60_000;
  const chatterCount = opt.chatterCount ?? 3;
  const standingMs = opt.standingMs ?? DAY;
  const span = Math.max(1, opt.to - opt.from);
  const inRange = activations.filter((a) => a.activatedAt >= opt.from && a.activatedAt < opt.to).sort((a, b) => a.activatedAt - b.activatedAt);
  const total = inRange.length;

  const periods = Math.ceil(span / TEN_MIN);
  const buckets = new Array<number>(periods).fill(0);
  for (const a of inRange) buckets[Math.floor((a.activatedAt - opt.from) / TEN_MIN)]++;

  const byKey = new Map<string, number[]>();
  for (const a of inRange) {
    const list = byKey.get(a.key) ?? [];
    list.push(a.activatedAt);
    byKey.set(a.key, list);
  }
  const mostFrequent = [...byKey.entries()]
    .map(([key, list]) => ({ key, count: list.length, share: list.length / total }))
    .sort((a, b) => b.count - a.count || a.key.localeCompare(b.key))
    .slice(0, opt.topN ?? 10);

  const chattering: PerformanceReport['chattering'] = [];
  for (const [key, list] of byKey) {
    let bursts = 0,
      maxIn = 0,
      lo = 0,
      inBurst = false;
    for (let hi = 0; hi < list.length; hi++) {
      while (list[hi] - list[lo] >= chatterWindow) lo++;
      const n = hi - lo + 1;
      maxIn = Math.max(maxIn, n);
      if (n >= chatterCount && !inBurst) {
        bursts++;
        inBurst = true;
      }
      if (n < chatterCount) inBurst = false;
    }
    if (bursts > 0) chattering.push({ key, bursts, maxInWindow: maxIn });
  }
  chattering.sort((a, b) => b.bursts - a.bursts || a.key.localeCompare(b.key));

  // Standing: every activation (not only those in range) still active, or active, beyond the limit by `to`.
  const standing = activations
    .filter((a) => a.activatedAt < opt.to && (a.clearedAt == null || a.clearedAt > opt.to) && opt.to - a.activatedAt > standingMs)
    .map((a) => ({ key: a.key, activatedAt: a.activatedAt, activeMs: opt.to - a.activatedAt }))
    .sort((a, b) => b.activeMs - a.activeMs);

  const ackTimes = inRange.filter((a) => a.acknowledgedAt != null && a.acknowledgedAt >= a.activatedAt).map((a) => a.acknowledgedAt! - a.activatedAt);
  return {
    from: opt.from,
    to: opt.to,
    total,
    days: span / DAY,
    perDay: total / (span / DAY),
    per10Min: total / (span / TEN_MIN),
    max10Min: buckets.length ? Math.max(...buckets) : 0,
    share10MinOver10: periods ? buckets.filter((b) => b > 10).length / periods : 0,
    mostFrequent,
    chattering,
    chatter: { count: chatterCount, windowMs: chatterWindow },
    standing,
    acknowledge: {
      count: ackTimes.length,
      meanMs: ackTimes.length ? ackTimes.reduce((s, x) => s + x, 0) / ackTimes.length : null,
      medianMs: ackTimes.length ? median(ackTimes) : null,
      unacknowledged: inRange.length - ackTimes.length,
    },
  };
}
