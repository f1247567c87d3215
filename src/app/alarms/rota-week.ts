import { overlapsOf, uncoveredSpans, type TimeSpan } from '../../../shared/oncall/coverage';
import { formatInZone, wallTimeToUtc } from '../ui/time-format';

/** A shift as the rota week draws it. */
export interface WeekShift {
  id: number;
  userId: number;
  userName: string;
  backupName: string | null;
  startsAt: number;
  endsAt: number;
}

/** One shift's part of one day: where it sits on the 24-hour bar (per cent) and its text. */
export interface DaySegment {
  shift: WeekShift;
  left: number;
  width: number;
  lane: number;
  text: string;
}

export interface DayGap extends TimeSpan {
  left: number;
  width: number;
  text: string;
}

export interface RotaDay {
  /** "Mon 2030-03-04" in the site's zone. */
  label: string;
  date: string;
  from: number;
  to: number;
  segments: DaySegment[];
  lanes: number;
  uncovered: DayGap[];
  overlaps: string[];
}

const WEEKDAYS = ['Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat', 'Sun'];

/** Calendar date (y, m, d) of the Monday of the week holding `at` in `zone`, moved by `weeks`. */
export function mondayOf(at: number, zone: string, weeks = 0): [number, number, number] {
  const [y, m, d] = formatInZone(at, zone, 'date').split('-').map(Number);
  const day = new Date(Date.UTC(y, m - 1, d));
  const back = (day.getUTCDay() + 6) % 7;
  const monday = new Date(Date.UTC(y, m - 1, d - back + weeks * 7));
  return [monday.getUTCFullYear(), monday.getUTCMonth() + 1, monday.getUTCDate()];
}

/** The 7 days from a Monday, each from its 00:00 to the next day's 00:00 in `zone` (23 or 25 h on clock-change days). */
export function weekDays(monday: [number, number, number], zone: string): { date: string; label: string; from: number; to: number }[] {
  const [y, m, d] = monday;
  return WEEKDAYS.map((name, i) => {
    const from = wallTimeToUtc(y, m, d + i, 0, 0, 0, zone);
    const to = wallTimeToUtc(y, m, d + i + 1, 0, 0, 0, zone);
    const date = formatInZone(from, zone, 'date');
    return { date, label: `${name} ${date}`, from, to };
  });
}

/** "07:00", or "24:00" for the end of the day. */
function clock(ms: number, day: { to: number }, zone: string): string {
  return ms >= day.to ? '24:00' : formatInZone(ms, zone, 'time', false);
}

/** The week of one site: each day's shifts on a 24-hour bar (in lanes where they overlap), its uncovered hours and overlaps. */
export function buildWeek(shifts: readonly WeekShift[], monday: [number, number, number], zone: string): RotaDay[] {
  return weekDays(monday, zone).map((day) => {
    const len = day.to - day.from;
    const pct = (ms: number) => ((Math.min(Math.max(ms, day.from), day.to) - day.from) / len) * 100;
    const inDay = shifts.filter((s) => s.startsAt < day.to && s.endsAt > day.from).sort((a, b) => a.startsAt - b.startsAt || a.id - b.id);
    const laneEnds: number[] = [];
    const segments = inDay.map((shift) => {
      let lane = laneEnds.findIndex((end) => end <= shift.startsAt);
      if (lane < 0) lane = laneEnds.push(0) - 1;
      laneEnds[lane] = shift.endsAt;
      const from = Math.max(shift.startsAt, day.from);
      const to = Math.min(shift.endsAt, day.to);
      return { shift, lane, left: pct(from), width: pct(to) - pct(from), text: `${clock(from, day, zone)}–${clock(to, day, zone)} ${shift.userName}` };
    });
    const uncovered = uncoveredSpans(inDay, day.from, day.to).map((g) => ({
      ...g,
      left: pct(g.from),
      width: pct(g.to) - pct(g.from),
      text: `${clock(g.from, day, zone)}–${clock(g.to, day, zone)}`,
    }));
    const overlaps: string[] = [];
    inDay.forEach((s, i) => {
      for (const o of overlapsOf(s, inDay.slice(i + 1))) {
        const from = Math.max(o.from, day.from);
        const to = Math.min(o.to, day.to);
        if (to <= from) continue;
        const who = o.samePerson
          ? `${s.userName} twice`
          : `${s.userName} and ${o.other.userId === s.userId ? s.userName : (inDay.find((x) => x.id === o.other.id)?.userName ?? 'another')}`;
        overlaps.push(`${clock(from, day, zone)}–${clock(to, day, zone)}: ${who}`);
      }
    });
    return { label: day.label, date: day.date, from: day.from, to: day.to, segments, lanes: Math.max(1, laneEnds.length), uncovered, overlaps };
  });
}
