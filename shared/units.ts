/**
 * Unit conversions at the edges. Storage and computation use degC, kPa (gauge), uS/cm, litres.
 * Factors are the exact ones of NIST SP 811 (2008), Appendix B.
 */
export const LITRES_PER_US_GALLON = 3.785411784;
export const LITRES_PER_US_PINT = 0.473176473;
export const KPA_PER_PSI = 6.894757293168361; // 1 lbf/in2 = 6.894 757 E+03 Pa
export const KPA_PER_BAR = 100;
export const KPA_PER_ATM = 101.325;

export type TemperatureUnit = 'degC' | 'degF' | 'K';
export type PressureUnit = 'kPa' | 'psi' | 'bar';
export type ConductivityUnit = 'uS/cm' | 'mS/cm';
export type VolumeUnit = 'L' | 'gal';

export const cToF = (c: number): number => (c * 9) / 5 + 32;
export const fToC = (f: number): number => ((f - 32) * 5) / 9;
/** A temperature difference (a margin, a rate), not a temperature: no 32 offset. */
export const deltaCToF = (dc: number): number => (dc * 9) / 5;
export const deltaFToC = (df: number): number => (df * 5) / 9;

export function toCelsius(value: number, unit: TemperatureUnit): number {
  if (unit === 'degC') return value;
  if (unit === 'degF') return fToC(value);
  return value - 273.15;
}
export function fromCelsius(c: number, unit: TemperatureUnit): number {
  if (unit === 'degC') return c;
  if (unit === 'degF') return cToF(c);
  return c + 273.15;
}

export function toKpa(value: number, unit: PressureUnit): number {
  if (unit === 'kPa') return value;
  if (unit === 'psi') return value * KPA_PER_PSI;
  return value * KPA_PER_BAR;
}
export function fromKpa(kpa: number, unit: PressureUnit): number {
  if (unit === 'kPa') return kpa;
  if (unit === 'psi') return kpa / KPA_PER_PSI;
  return kpa / KPA_PER_BAR;
}

export function toMicroSiemens(value: number, unit: ConductivityUnit): number {
  return unit === 'uS/cm' ? value : value * 1000;
}

export const litresToGallons = (l: number): number => l / LITRES_PER_US_GALLON;
export const gallonsToLitres = (g: number): number => g * LITRES_PER_US_GALLON;

/** Absolute pressure from a gauge reading, against a standard atmosphere unless a barometric value is known. */
export const gaugeToAbsoluteKpa = (gaugeKpa: number, atmosphereKpa = KPA_PER_ATM): number => gaugeKpa + atmosphereKpa;

/** Display symbols. */
export const UNIT_SYMBOL: Record<string, string> = {
  degC: '°C',
  degF: '°F',
  K: 'K',
  kPa: 'kPa',
  psi: 'psi',
  bar: 'bar',
  'uS/cm': 'µS/cm',
  'mS/cm': 'mS/cm',
  rpm: 'rpm',
  L: 'L',
  gal: 'US gal',
};
