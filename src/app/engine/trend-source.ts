/** Where the trend's buckets came from, as the readings API tells it. */
export interface TrendSource {
  /** 'rollup': per-minute summaries (long spans, or ranges reaching back past the raw retention). */
  source: 'raw' | 'rollup';
  /** Per-minute summaries, or per-hour ones for long spans (30-day charts); absent or null for raw. */
  rollupPeriod?: 'minute' | 'hour' | null;
  /** Raw readings are kept this many days (0: for good). */
  rawRetentionDays: number;
  /** Raw readings are kept from this instant on (ms); null when kept for good. */
  rawKeptFrom: number | null;
  /** The range starts before rawKeptFrom. */
  beyondRawRetention: boolean;
}

export const RAW_SOURCE: TrendSource = { source: 'raw', rawRetentionDays: 0, rawKeptFrom: null, beyondRawRetention: false };

/** One source for several channels fetched for the same window: summaries if any of them is. */
export function combineSources(list: readonly TrendSource[]): TrendSource {
  if (!list.length) return RAW_SOURCE;
  return {
    source: list.some((s) => s.source === 'rollup') ? 'rollup' : 'raw',
    rollupPeriod: list.some((s) => s.rollupPeriod === 'hour') ? 'hour' : list.some((s) => s.source === 'rollup') ? 'minute' : null,
    rawRetentionDays: list[0].rawRetentionDays,
    rawKeptFrom: list[0].rawKeptFrom,
    beyondRawRetention: list.some((s) => s.beyondRawRetention),
  };
}

/** The source in a few words, for the CSV's source column. */
export function sourceWords(s: TrendSource): string {
  const summaries = s.rollupPeriod === 'hour' ? 'per-hour summaries' : 'per-minute summaries';
  if (s.beyondRawRetention) return `${summaries} (raw readings are kept ${s.rawRetentionDays} days)`;
  return s.source === 'rollup' ? summaries : 'raw readings';
}
