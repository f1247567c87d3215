import { RUNNING_RPM } from '../../../shared/channels';
import { Bucket, appendLive, bucketWidth, runChanges, toChannelSeries } from './trend-series';
import { bucketsToCsv } from './readings-csv';
import { niceExtent } from './trend-chart';

const b = (t: number, mean: number, min = mean, max = mean, count = 1): Bucket => ({ t, min, max, mean, count });

describe('appendLive (bounded live extension of the trend)', () => {
  it('never holds more than maxPoints, however many samples arrive', () => {
    let series: Bucket[] = [];
    const opts = { from: 0, maxPoints: 300, bucketMs: 1000 };
    for (let i = 0; i < 5000; i++) {
      series = appendLive(series, [{ t: i * 1000, value: 80 + (i % 7) }], opts);
      expect(series.length).toBeLessThanOrEqual(300);
    }
    expect(series).toHaveLength(300);
    // the newest are kept, the oldest dropped
    expect(series[series.length - 1].t).toBe(4999 * 1000);
    expect(series[0].t).toBe(4700 * 1000);
  });

  it('drops points older than the start of the window', () => {
    const loaded = [b(0, 80), b(1000, 81), b(2000, 82)];
    const out = appendLive(loaded, [{ t: 3000, value: 83 }], { from: 1500, maxPoints: 100, bucketMs: 1000 });
    expect(out.map((x) => x.t)).toEqual([2000, 3000]);
    expect(loaded).toHaveLength(3); // input untouched
  });

  it('folds samples inside the newest bucket into it: min, max, running mean, count', () => {
    const out = appendLive(
      [b(0, 80, 79, 81, 4)],
      [
        { t: 100, value: 90 },
        { t: 200, value: 70 },
      ],
      { from: 0, maxPoints: 10, bucketMs: 1000 },
    );
    expect(out).toHaveLength(1);
    expect(out[0]).toEqual({ t: 0, min: 70, max: 90, count: 6, mean: (80 * 4 + 90 + 70) / 6 });
  });

  it('ignores samples older than the loaded history and non-finite values', () => {
    const out = appendLive(
      [b(5000, 80)],
      [
        { t: 1000, value: 99 },
        { t: 7000, value: Number.NaN },
      ],
      { from: 0, maxPoints: 10, bucketMs: 1000 },
    );
    expect(out).toEqual([b(5000, 80)]);
  });
});

describe('bucketWidth', () => {
  it('matches the server: raw buckets up to 6 h, whole minutes beyond', () => {
    expect(bucketWidth(0, 3600_000, 1200)).toBe(3000);
    expect(bucketWidth(0, 30 * 86400_000, 1200)).toBe(36 * 60_000); // 43200 min / 1200 = 36 min
  });
});

describe('toChannelSeries', () => {
  it('converts mean and min-max to °F with t/°F = 1.8 t/°C + 32 (NIST SP 811, Appendix B)', () => {
    const s = toChannelSeries('coolant_temp', [b(0, 100, 0, 100)], { temperature: 'degF', pressure: 'kPa', volume: 'L' });
    expect(s.unit).toBe('°F');
    expect(s.mean).toEqual([{ x: 0, y: 212 }]);
    expect(s.range).toEqual([{ x: 0, y: [32, 212] }]);
  });
  it('converts pressure to psi with 1 psi = 6.894 757 kPa (NIST SP 811)', () => {
    const s = toChannelSeries('coolant_pressure', [b(0, 68.94757)], { temperature: 'degC', pressure: 'psi', volume: 'L' });
    expect(s.mean[0].y).toBeCloseTo(10, 3);
  });
});

describe('runChanges', () => {
  it('marks starts and stops where engine speed crosses RUNNING_RPM', () => {
    const speed = [b(0, 0), b(1, 0), b(2, 1800), b(3, 1800), b(4, RUNNING_RPM), b(5, 0), b(6, 1500)];
    expect(runChanges(speed)).toEqual([
      { t: 2, kind: 'start' },
      { t: 4, kind: 'stop' }, // at RUNNING_RPM exactly the engine does not count as running
      { t: 6, kind: 'start' },
    ]);
    expect(runChanges([])).toEqual([]);
  });
});

describe('bucketsToCsv', () => {
  it('writes one row per bucket with ISO time, channel, min, max, mean, count and unit', () => {
    const csv = bucketsToCsv(new Map([['coolant_temp', [b(Date.UTC(2026, 0, 1), 90, 80, 100, 12)]]]), { temperature: 'degF', pressure: 'kPa', volume: 'L' });
    expect(csv).toBe('time,channel,min,max,mean,count,unit\r\n2026-01-01T00:00:00.000Z,coolant_temp,176,212,194,12,degF\r\n');
  });
});

describe('niceExtent (trend y axis)', () => {
  it('rounds out to four round steps that hold the data and the band', () => {
    expect(niceExtent(30, 95)).toEqual({ lo: 20, hi: 100 }); // steps of 10 and 15 fall short of 95; 20 reaches it
    expect(niceExtent(3.2, 118)).toEqual({ lo: 0, hi: 120 }); // steps of 30 from 0
    expect(niceExtent(-3, 110)).toEqual({ lo: -40, hi: 120 }); // below zero only because the data is
    expect(niceExtent(2400, 2500)).toEqual({ lo: 2400, hi: 2500 }); // steps of 25
  });
});
