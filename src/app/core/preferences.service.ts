import { DOCUMENT, Injectable, computed, effect, inject, signal } from '@angular/core';
import { PressureUnit, TemperatureUnit } from '../../../shared/units';

export type UnitSystem = 'metric' | 'us';
export type DisplayVolumeUnit = 'L' | 'gal';
export type ThemeChoice = 'light' | 'dark' | 'system';
/** Times in each site's zone (default) or in the browser's zone. */
export type TimeZoneChoice = 'site' | 'browser';

export interface Preferences {
  temperature: Extract<TemperatureUnit, 'degC' | 'degF'>;
  pressure: PressureUnit;
  volume: DisplayVolumeUnit;
  theme: ThemeChoice;
  timeZone: TimeZoneChoice;
}

export const METRIC_UNITS: Pick<Preferences, 'temperature' | 'pressure' | 'volume'> = { temperature: 'degC', pressure: 'kPa', volume: 'L' };
export const US_UNITS: Pick<Preferences, 'temperature' | 'pressure' | 'volume'> = { temperature: 'degF', pressure: 'psi', volume: 'gal' };

const DEFAULTS: Preferences = { ...METRIC_UNITS, theme: 'system', timeZone: 'site' };
const STORAGE_KEY = 'jw.preferences';

/** Display units and theme, per browser. Storage and the API stay in SI whatever is chosen here. */
@Injectable({ providedIn: 'root' })
export class PreferencesService {
  private readonly document = inject(DOCUMENT);
  private readonly state = signal<Preferences>(load());

  readonly preferences = this.state.asReadonly();
  readonly temperatureUnit = computed(() => this.state().temperature);
  readonly pressureUnit = computed(() => this.state().pressure);
  readonly volumeUnit = computed(() => this.state().volume);
  readonly theme = computed(() => this.state().theme);
  /** 'metric' or 'us' when every unit matches that system; null for a mix (e.g. °C with psi). */
  readonly unitSystem = computed<UnitSystem | null>(() => {
    const p = this.state();
    if (sameUnits(p, METRIC_UNITS)) return 'metric';
    if (sameUnits(p, US_UNITS)) return 'us';
    return null;
  });

  private readonly prefersDark = this.document.defaultView?.matchMedia?.('(prefers-color-scheme: dark)');
  private readonly systemDark = signal(this.prefersDark?.matches ?? false);
  readonly dark = computed(() => (this.theme() === 'system' ? this.systemDark() : this.theme() === 'dark'));

  constructor() {
    this.prefersDark?.addEventListener?.('change', (e) => this.systemDark.set(e.matches));
    effect(() => this.document.documentElement.classList.toggle('jw-dark', this.dark()));
    effect(() => save(this.state()));
  }

  update(change: Partial<Preferences>): void {
    this.state.update((p) => ({ ...p, ...change }));
  }

  useSystem(system: UnitSystem): void {
    this.update(system === 'us' ? US_UNITS : METRIC_UNITS);
  }
}

function sameUnits(p: Preferences, units: typeof METRIC_UNITS): boolean {
  return p.temperature === units.temperature && p.pressure === units.pressure && p.volume === units.volume;
}

function load(): Preferences {
  try {
    const raw = globalThis.localStorage?.getItem(STORAGE_KEY);
    if (!raw) return DEFAULTS;
    const p = JSON.parse(raw) as Partial<Preferences>;
    return {
      temperature: p.temperature === 'degF' ? 'degF' : 'degC',
      pressure: p.pressure === 'psi' || p.pressure === 'bar' ? p.pressure : 'kPa',
      volume: p.volume === 'gal' ? 'gal' : 'L',
      theme: p.theme === 'light' || p.theme === 'dark' ? p.theme : 'system',
      timeZone: p.timeZone === 'browser' ? 'browser' : 'site',
    };
  } catch {
    return DEFAULTS;
  }
}

function save(p: Preferences): void {
  try {
    globalThis.localStorage?.setItem(STORAGE_KEY, JSON.stringify(p));
  } catch {
    /* kept for this visit only */
  }
}
