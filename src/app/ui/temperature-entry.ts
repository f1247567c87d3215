import { deltaCToF, deltaFToC, fromCelsius, toCelsius, UNIT_SYMBOL } from '../../../shared/units';

/** The user's temperature unit for typing values (storage and the API stay in °C / K). */
export type EntryTemperatureUnit = 'degC' | 'degF';

const round1 = (v: number): number => Math.round(v * 10) / 10;

/** A stored °C value as typed in the user's unit, to 0.1. */
export const temperatureForEntry = (c: number, unit: EntryTemperatureUnit): number => round1(fromCelsius(c, unit));
/** A typed temperature back to °C. */
export const temperatureFromEntry = (v: number, unit: EntryTemperatureUnit): number => toCelsius(v, unit);
/** A stored difference in K as typed in the user's unit (K or °F), to 0.1. */
export const differenceForEntry = (k: number, unit: EntryTemperatureUnit): number => round1(unit === 'degF' ? deltaCToF(k) : k);
/** A typed difference back to K. */
export const differenceFromEntry = (v: number, unit: EntryTemperatureUnit): number => (unit === 'degF' ? deltaFToC(v) : v);
/** Symbol of a temperature in the unit: °C or °F. */
export const temperatureSymbol = (unit: EntryTemperatureUnit): string => UNIT_SYMBOL[unit];
/** Symbol of a temperature difference in the unit: K or °F. */
export const differenceSymbol = (unit: EntryTemperatureUnit): string => (unit === 'degF' ? UNIT_SYMBOL['degF'] : 'K');
/** The server's °C limits in the user's unit, rounded inwards to 0.1. */
export function temperatureLimitsForEntry(minC: number, maxC: number, unit: EntryTemperatureUnit): { min: number; max: number } {
  return { min: Math.ceil(fromCelsius(minC, unit) * 10 - 1e-9) / 10, max: Math.floor(fromCelsius(maxC, unit) * 10 + 1e-9) / 10 };
}
