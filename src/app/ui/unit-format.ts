import { CHANNELS, ChannelKey, isChannelKey } from '../../../shared/channels';
import { UNIT_SYMBOL, cToF, deltaCToF, fromKpa, litresToGallons } from '../../../shared/units';
import { Preferences } from '../core/preferences.service';

/** What a stored number measures. Stored units: °C, K difference as °C, kPa gauge, µS/cm, rpm, L. */
export type DisplayQuantity = 'temperature' | 'temperature-difference' | 'pressure' | 'conductivity' | 'speed' | 'volume';

export type UnitPreferences = Pick<Preferences, 'temperature' | 'pressure' | 'volume'>;

export interface DisplayValue {
  /** The number converted and rounded, as text. */
  text: string;
  symbol: string;
}

/** Shown where a value is missing. */
export const NO_VALUE = '—';

const DECIMALS: Record<string, number> = { degC: 1, degF: 1, kPa: 0, psi: 1, bar: 2, 'uS/cm': 0, rpm: 0, L: 0, gal: 1 };

const formatters = new Map<number, Intl.NumberFormat>();
function formatNumber(value: number, decimals: number): string {
  let f = formatters.get(decimals);
  if (!f) {
    f = new Intl.NumberFormat('en-US', { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
    formatters.set(decimals, f);
  }
  // Avoid "-0.0" for values that round to zero.
  return f.format(value).replace(/^-(0(\.0+)?)$/, '$1');
}

export function quantityOf(what: ChannelKey | DisplayQuantity): DisplayQuantity {
  return isChannelKey(what) ? CHANNELS[what].quantity : what;
}

/** Convert a stored value to the user's unit; returns the number and the unit key. */
export function convertStored(value: number, quantity: DisplayQuantity, prefs: UnitPreferences): { value: number; unit: string } {
  switch (quantity) {
    case 'temperature':
      return prefs.temperature === 'degF' ? { value: cToF(value), unit: 'degF' } : { value, unit: 'degC' };
    case 'temperature-difference':
      return prefs.temperature === 'degF' ? { value: deltaCToF(value), unit: 'degF' } : { value, unit: 'degC' };
    case 'pressure':
      return { value: fromKpa(value, prefs.pressure), unit: prefs.pressure };
    case 'volume':
      return prefs.volume === 'gal' ? { value: litresToGallons(value), unit: 'gal' } : { value, unit: 'L' };
    case 'conductivity':
      return { value, unit: 'uS/cm' };
    case 'speed':
      return { value, unit: 'rpm' };
  }
}

export function unitSymbol(quantity: DisplayQuantity, prefs: UnitPreferences): string {
  return UNIT_SYMBOL[convertStored(0, quantity, prefs).unit];
}

export function displayValue(value: number | null | undefined, what: ChannelKey | DisplayQuantity, prefs: UnitPreferences, decimals?: number): DisplayValue {
  const quantity = quantityOf(what);
  const converted = convertStored(0, quantity, prefs);
  const symbol = UNIT_SYMBOL[converted.unit];
  if (value === null || value === undefined || !Number.isFinite(value)) return { text: NO_VALUE, symbol };
  const c = convertStored(value, quantity, prefs);
  return { text: formatNumber(c.value, decimals ?? DECIMALS[c.unit] ?? 1), symbol };
}

/** "82.4 °C"; a missing value shows as a dash without a unit. */
export function formatStored(value: number | null | undefined, what: ChannelKey | DisplayQuantity, prefs: UnitPreferences, decimals?: number): string {
  const d = displayValue(value, what, prefs, decimals);
  return d.text === NO_VALUE ? NO_VALUE : `${d.text} ${d.symbol}`;
}
