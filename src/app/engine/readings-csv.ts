import { ChannelKey } from '../../../shared/channels';
import { UnitPreferences, convertStored, quantityOf } from '../ui/unit-format';
import { Bucket } from './trend-series';
import { TrendSource, sourceWords } from './trend-source';

const HEADER = 'time,channel,min,max,mean,count,unit';

const num = (v: number) => String(Math.round(v * 10000) / 10000);

/**
 * The trend's buckets as CSV (RFC 4180, CRLF line ends): one row per bucket and channel, time as ISO 8601 UTC,
 * values in the units on screen, the unit as its plain key (degC, degF, kPa, psi, bar, uS/cm, rpm).
 * With a source, a last column says in words whether the rows are raw readings or per-minute summaries
 * (and why: a window older than the raw retention has only summaries left).
 */
export function bucketsToCsv(data: ReadonlyMap<ChannelKey, readonly Bucket[]>, prefs: UnitPreferences, source?: TrendSource): string {
  const words = source ? sourceWords(source) : null;
  const rows = [words === null ? HEADER : HEADER + ',source'];
  for (const [channel, buckets] of data) {
    const quantity = quantityOf(channel);
    const unit = convertStored(0, quantity, prefs).unit;
    const conv = (v: number) => num(convertStored(v, quantity, prefs).value);
    for (const b of buckets) {
      const cells = [new Date(b.t).toISOString(), channel, conv(b.min), conv(b.max), conv(b.mean), String(b.count), unit];
      if (words !== null) cells.push(`"${words}"`);
      rows.push(cells.join(','));
    }
  }
  return rows.join('\r\n') + '\r\n';
}

/** Offers a text as a file download. */
export function downloadText(doc: Document, name: string, text: string, type = 'text/csv;charset=utf-8'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = doc.createElement('a');
  a.href = url;
  a.download = name;
  a.click();
  setTimeout(() => URL.revokeObjectURL(url), 0);
}
