/**
 * Boiling point of water-glycol coolant at the system pressure.
 *
 * Water's saturation line comes from IAPWS-IF97 (region 4). Glycol is accounted for by Raoult's law on the
 * water mole fraction: the mix boils when x_water * Psat(T) equals the absolute pressure. This treats the mix
 * as an ideal solution and neglects the vapour pressure of the glycol itself (far below water's at these
 * temperatures). It is a documented approximation: good to about a degree or two at the usual 30-60 % mixes.
 */
import { KPA_PER_ATM } from '../units';
import { ConcentrationBasis, CONCENTRATION_BASES, GLYCOL_TYPES, GlycolType, waterMoleFraction } from './glycol';
import { saturationTemperatureK, SATURATION_P_MAX_MPA, SATURATION_P_MIN_MPA } from './water-saturation';
import { CoolantInputError, requireFinite, requireInRange, requireOneOf } from './validate';

/** Above this the ideal-solution estimate is not trusted (and the mix is far outside practice). */
export const BOILING_MAX_GLYCOL_PERCENT = 80;

/**
 * Boiling point in °C of the mix at a gauge pressure in kPa.
 * Absolute pressure = gauge + atmosphereKpa (standard atmosphere 101.325 kPa unless a barometric value is given).
 * percent = 0 gives pure water.
 */
export function boilingPointC(gaugeKpa: number, glycol: GlycolType, percent: number, basis: ConcentrationBasis, atmosphereKpa: number = KPA_PER_ATM): number {
  const gauge = requireFinite('gaugeKpa', gaugeKpa);
  const atm = requireInRange('atmosphereKpa', atmosphereKpa, 30, 110, 'kPa');
  requireOneOf('glycol', glycol, GLYCOL_TYPES);
  requireOneOf('basis', basis, CONCENTRATION_BASES);
  requireInRange('percent', percent, 0, BOILING_MAX_GLYCOL_PERCENT, '%');
  const absoluteMPa = (gauge + atm) / 1000;
  if (absoluteMPa <= 0) {
    throw new CoolantInputError('gaugeKpa', `absolute pressure must be above zero (gauge ${gauge} kPa with atmosphere ${atm} kPa)`);
  }
  const xw = waterMoleFraction(glycol, percent, basis);
  // Raoult: the water must reach a vapour pressure of p / x_w before the mix boils.
  const waterEquivalentMPa = absoluteMPa / xw;
  if (waterEquivalentMPa < SATURATION_P_MIN_MPA || waterEquivalentMPa > SATURATION_P_MAX_MPA) {
    throw new CoolantInputError('gaugeKpa', `pressure outside the range of the water saturation equations (gauge ${gauge} kPa)`);
  }
  return saturationTemperatureK(waterEquivalentMPa) - 273.15;
}

/**
 * Boiling margin in °C: boiling point at the present system pressure minus the coolant temperature.
 * Negative means the coolant is at or above its boiling point.
 */
export function boilingMarginC(
  coolantTempC: number,
  gaugeKpa: number,
  glycol: GlycolType,
  percent: number,
  basis: ConcentrationBasis,
  atmosphereKpa: number = KPA_PER_ATM,
): number {
  const t = requireInRange('coolantTempC', coolantTempC, -273.15, 1000, '°C');
  return boilingPointC(gaugeKpa, glycol, percent, basis, atmosphereKpa) - t;
}
