import { Injectable, computed, inject } from '@angular/core';
import { browserZone } from '../ui/time-format';
import { PreferencesService } from './preferences.service';

/** Which zone times are shown in: the site's (default) or, if the user prefers, the browser's. */
@Injectable({ providedIn: 'root' })
export class DisplayZone {
  private readonly prefs = inject(PreferencesService);
  readonly useBrowser = computed(() => this.prefs.preferences().timeZone === 'browser');

  /** The zone for times of a site whose zone is `siteZone` (null when unknown: the browser's). */
  zoneFor(siteZone: string | null | undefined): string {
    return this.useBrowser() || !siteZone ? browserZone() : siteZone;
  }
}
