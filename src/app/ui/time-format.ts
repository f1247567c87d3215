import { Pipe, PipeTransform } from '@angular/core';
import { formatInZone, type TimeInput, type TimeStyle } from '../../../shared/time/zoned-time';

export { browserZone, formatInZone, toZonedInput, wallTimeToUtc, zoneAbbreviation, zoneOffsetMs } from '../../../shared/time/zoned-time';
export type { TimeInput, TimeStyle } from '../../../shared/time/zoned-time';

/** `{{ t | jwTime: zone : 'datetime-s' }}`; the zone comes from DisplayZone (site's zone or the browser's, as the user prefers). */
@Pipe({ name: 'jwTime' })
export class JwTimePipe implements PipeTransform {
  transform(at: TimeInput, zone: string | null | undefined, style: TimeStyle = 'datetime', withZone = true): string {
    return formatInZone(at, zone, style, withZone);
  }
}
