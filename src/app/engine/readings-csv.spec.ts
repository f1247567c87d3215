import { bucketsToCsv } from './readings-csv';
import { combineSources, sourceWords } from './trend-source';

const b = (t: number) => ({ t, min: 80, max: 90, mean: 85, count: 60 });
const prefs = { temperature: 'degC', pressure: 'kPa', volume: 'L' } as const;

describe('CSV source column', () => {
  it('says in words when the window is older than the raw retention', () => {
    const source = { source: 'rollup' as const, rawRetentionDays: 400, rawKeptFrom: Date.UTC(2025, 9, 28), beyondRawRetention: true };
    const csv = bucketsToCsv(new Map([['coolant_temp', [b(Date.UTC(2025, 0, 1))]]]), prefs, source);
    expect(csv).toBe(
      'time,channel,min,max,mean,count,unit,source\r\n' +
        '2025-01-01T00:00:00.000Z,coolant_temp,80,90,85,60,degC,"per-minute summaries (raw readings are kept 400 days)"\r\n',
    );
  });

  it('names raw readings and summaries of long windows', () => {
    const raw = { source: 'raw' as const, rawRetentionDays: 400, rawKeptFrom: 0, beyondRawRetention: false };
    expect(sourceWords(raw)).toBe('raw readings');
    expect(sourceWords(combineSources([raw, { ...raw, source: 'rollup' }]))).toBe('per-minute summaries');
  });

  it('names per-hour summaries when any channel of the window came from them', () => {
    const raw = { source: 'raw' as const, rawRetentionDays: 400, rawKeptFrom: 0, beyondRawRetention: false };
    const hourly = { ...raw, source: 'rollup' as const, rollupPeriod: 'hour' as const };
    expect(sourceWords(combineSources([{ ...raw, source: 'rollup', rollupPeriod: 'minute' }, hourly]))).toBe('per-hour summaries');
    expect(sourceWords({ ...hourly, beyondRawRetention: true })).toBe('per-hour summaries (raw readings are kept 400 days)');
  });
});
