/**
 * The one way the app writes a time: 24-hour clock, ISO-like dates, in a named IANA zone with its abbreviation,
 * e.g. "2026-12-02 14:05 MST", "14:05:09 MST". Every screen uses this (through the jwTime pipe or the functions), and so do the e-mails.
 * Pure: Intl only, no I/O; shared by the app (src/app/ui/time-format.ts) and the server.
 */
export type TimeStyle = 'datetime' | 'datetime-s' | 'time' | 'time-s' | 'date';

export type TimeInput = number | string | Date | null | undefined;

const partsFormatters = new Map<string, Intl.DateTimeFormat>();
const zoneFormatters = new Map<string, Intl.DateTimeFormat>();

/** The browser's own zone (the fallback when a site's zone is unknown). */
export function browserZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC';
}

function validZone(zone: string | null | undefined): string {
  if (!zone) return browserZone();
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: zone });
    return zone;
  } catch {
    return browserZone();
  }
}

function toMs(at: TimeInput): number | null {
  if (at === null || at === undefined || at === '') return null;
  const ms = at instanceof Date ? at.getTime() : typeof at === 'number' ? at : Date.parse(at);
  return Number.isFinite(ms) ? ms : null;
}

function parts(ms: number, zone: string): Record<string, string> {
  let f = partsFormatters.get(zone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone: zone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
    });
    partsFormatters.set(zone, f);
  }
  const out: Record<string, string> = {};
  for (const p of f.formatToParts(ms)) out[p.type] = p.value;
  return out;
}

/** "MST", "CET", "UTC"; where the browser knows no short name, the offset ("GMT+5:30"). */
export function zoneAbbreviation(at: TimeInput, zone: string | null | undefined): string {
  const ms = toMs(at) ?? Date.now();
  const z = validZone(zone);
  let f = zoneFormatters.get(z);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', { timeZone: z, timeZoneName: 'short' });
    zoneFormatters.set(z, f);
  }
  return f.formatToParts(ms).find((p) => p.type === 'timeZoneName')?.value ?? z;
}

/** A time in the given zone; '—' when there is none. `withZone` adds the zone's abbreviation (default true). */
export function formatInZone(at: TimeInput, zone: string | null | undefined, style: TimeStyle = 'datetime', withZone = true): string {
  // A bare calendar date (a lab's test date) names a day, not a moment: never shift it into another zone.
  if (typeof at === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(at)) return at;
  const ms = toMs(at);
  if (ms === null) return '—';
  const z = validZone(zone);
  const p = parts(ms, z);
  const date = `${p['year']}-${p['month']}-${p['day']}`;
  const hm = `${p['hour'] === '24' ? '00' : p['hour']}:${p['minute']}`;
  const text =
    style === 'date'
      ? date
      : style === 'time'
        ? hm
        : style === 'time-s'
          ? `${hm}:${p['second']}`
          : style === 'datetime-s'
            ? `${date} ${hm}:${p['second']}`
            : `${date} ${hm}`;
  return withZone && style !== 'date' ? `${text} ${zoneAbbreviation(ms, z)}` : text;
}

/** How far the zone's wall clock is ahead of UTC at `ms` (ms; negative west of Greenwich). */
export function zoneOffsetMs(ms: number, zone: string): number {
  const p = parts(ms, validZone(zone));
  const wall = Date.UTC(+p['year'], +p['month'] - 1, +p['day'], p['hour'] === '24' ? 0 : +p['hour'], +p['minute'], +p['second']);
  return wall - Math.floor(ms / 1000) * 1000;
}

/** The instant a wall-clock time in `zone` stands for (the earlier one when the clock is set back). */
export function wallTimeToUtc(y: number, month: number, d: number, h: number, min: number, s: number, zone: string): number {
  const guess = Date.UTC(y, month - 1, d, h, min, s);
  const first = guess - zoneOffsetMs(guess, zone);
  return guess - zoneOffsetMs(first, zone);
}

/** `yyyy-MM-ddTHH:mm` of an instant in `zone`, as an <input type="datetime-local"> wants it. */
export function toZonedInput(ms: number, zone: string): string {
  const p = parts(ms, validZone(zone));
  return `${p['year']}-${p['month']}-${p['day']}T${p['hour'] === '24' ? '00' : p['hour']}:${p['minute']}`;
}
