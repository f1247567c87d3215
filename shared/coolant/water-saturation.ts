/**
 * Saturation line of water (boiling temperature <-> vapour pressure) from IAPWS-IF97,
 * "Revised Release on the IAPWS Industrial Formulation 1997 for the Thermodynamic Properties
 * of Water and Steam" (IAPWS R7-97(2012)), region 4, equations 29 to 31 and table 34.
 * Pure functions, SI-style units of the release: kelvin and megapascals (absolute).
 */
import { CoolantInputError, requireFinite } from './validate';

/** Table 34 of IAPWS-IF97: coefficients n1..n10 of the saturation-pressure equation. */
const N = [
  0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.1202082470247e5, -0.32325550322333e7, 0.1491510861353e2, -0.48232657361591e4,
  0.40511340542057e6, -0.23855557567849, 0.65017534844798e3,
] as const;
const [n1, n2, n3, n4, n5, n6, n7, n8, n9, n10] = N;

/** Validity of region 4: from the triple point to the critical point. */
export const SATURATION_T_MIN_K = 273.15;
export const SATURATION_T_MAX_K = 647.096;
/** Psat at 273.15 K (IAPWS-IF97: 611.213 Pa) and the critical pressure 22.064 MPa. */
export const SATURATION_P_MIN_MPA = 611.212677e-6;
export const SATURATION_P_MAX_MPA = 22.064;

/** Vapour pressure of water in MPa at temperature TK (IAPWS-IF97 eq. 30). */
export function saturationPressureMPa(TK: number): number {
  const T = requireFinite('TK', TK);
  if (T < SATURATION_T_MIN_K || T > SATURATION_T_MAX_K) {
    throw new CoolantInputError('TK', `saturation temperature must be between ${SATURATION_T_MIN_K} and ${SATURATION_T_MAX_K} K (got ${T} K)`);
  }
  const theta = T + n9 / (T - n10);
  const A = theta * theta + n1 * theta + n2;
  const B = n3 * theta * theta + n4 * theta + n5;
  const C = n6 * theta * theta + n7 * theta + n8;
  return Math.pow((2 * C) / (-B + Math.sqrt(B * B - 4 * A * C)), 4);
}

/** Boiling temperature of water in K at absolute pressure pMPa (IAPWS-IF97 eq. 31, the backward equation). */
export function saturationTemperatureK(pMPa: number): number {
  const p = requireFinite('pMPa', pMPa);
  // A hair of tolerance at the ends so that values computed from the limit temperatures round-trip.
  if (p < SATURATION_P_MIN_MPA * (1 - 1e-6) || p > SATURATION_P_MAX_MPA * (1 + 1e-9)) {
    throw new CoolantInputError('pMPa', `saturation pressure must be between ${SATURATION_P_MIN_MPA} and ${SATURATION_P_MAX_MPA} MPa absolute (got ${p} MPa)`);
  }
  const beta = Math.pow(p, 0.25);
  const E = beta * beta + n3 * beta + n6;
  const F = n1 * beta * beta + n4 * beta + n7;
  const G = n2 * beta * beta + n5 * beta + n8;
  const D = (2 * G) / (-F - Math.sqrt(F * F - 4 * E * G));
  return (n10 + D - Math.sqrt((n10 + D) * (n10 + D) - 4 * (n9 + n10 * D))) / 2;
}
