import { buildWeek, mondayOf, weekDays, type WeekShift } from './rota-week';
import { wallTimeToUtc } from '../ui/time-format';

const ZONE = 'America/Chicago';
const at = (d: number, h: number) => wallTimeToUtc(2030, 3, d, h, 0, 0, ZONE);
const shift = (id: number, name: string, from: number, to: number): WeekShift => ({
  id,
  userId: id,
  userName: name,
  backupName: null,
  startsAt: from,
  endsAt: to,
});

describe('rota week', () => {
  it('finds the Monday of the week in the site zone, not UTC', () => {
    // Sunday 2030-03-10 20:00 in Chicago is already Monday in UTC
    expect(mondayOf(at(10, 20), ZONE)).toEqual([2030, 3, 4]);
    expect(mondayOf(at(10, 20), ZONE, 1)).toEqual([2030, 3, 11]);
  });

  it('makes the clock-change day 23 hours long', () => {
    const days = weekDays([2030, 3, 4], ZONE);
    expect(days.map((d) => d.label)[6]).toBe('Sun 2030-03-10');
    expect((days[6].to - days[6].from) / 3_600_000).toBe(23);
  });

  it('draws shifts in 24-hour time, with uncovered hours and overlaps', () => {
    const week = buildWeek([shift(1, 'A', at(4, 0), at(4, 12)), shift(2, 'B', at(4, 10), at(4, 20))], [2030, 3, 4], ZONE);
    const mon = week[0];
    expect(mon.segments.map((s) => s.text)).toEqual(['00:00–12:00 A', '10:00–20:00 B']);
    expect(mon.lanes).toBe(2);
    expect(mon.uncovered.map((g) => g.text)).toEqual(['20:00–24:00']);
    expect(mon.overlaps).toEqual(['10:00–12:00: A and B']);
    expect(week[1].uncovered.map((g) => g.text)).toEqual(['00:00–24:00']);
  });
});
