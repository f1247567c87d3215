import { formatInZone } from '../ui/time-format';

/** Windows up to this long label the time axis with the time of day only. */
const TIME_ONLY_MAX_MS = 36 * 3600_000;

/**
 * A tick label of the trend's time axis in the page's zone (the site's, or the browser's by preference), in the
 * app's one 24-hour format: "14:05" within a day and a half, "12-02 14:05" for longer windows. apexcharts would
 * label in the browser's zone; the window line above the chart names the zone.
 */
export function trendAxisLabel(at: number, spanMs: number, zone: string | null | undefined): string {
  if (!Number.isFinite(at)) return '';
  if (spanMs <= TIME_ONLY_MAX_MS) return formatInZone(at, zone, 'time', false);
  return formatInZone(at, zone, 'datetime', false).slice(5);
}
