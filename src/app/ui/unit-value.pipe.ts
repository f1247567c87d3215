import { Pipe, PipeTransform, inject } from '@angular/core';
import { ChannelKey } from '../../../shared/channels';
import { PreferencesService } from '../core/preferences.service';
import { DisplayQuantity, formatStored } from './unit-format';

/**
 * A stored SI value shown in the user's unit with its symbol: `{{ 82.4 | unitValue: 'coolant_temp' }}` -> "82.4 °C" or "180.3 °F".
 * Not pure, so a change of units in the settings shows at once; the work per call is one conversion.
 */
@Pipe({ name: 'unitValue', pure: false })
export class UnitValuePipe implements PipeTransform {
  private readonly prefs = inject(PreferencesService);

  transform(value: number | null | undefined, what: ChannelKey | DisplayQuantity, decimals?: number): string {
    return formatStored(value, what, this.prefs.preferences(), decimals);
  }
}
