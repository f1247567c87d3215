/**
 * Atmospheric pressure at a site's elevation from the ICAO standard atmosphere (ICAO Doc 7488, Manual of
 * the ICAO Standard Atmosphere; the same model as ISO 2533), troposphere layer:
 *   p = 101.325 kPa × (1 − 2.25577 × 10⁻⁵ × h)^5.25588, h in metres above mean sea level.
 * A standard day: the local barometer differs by a few kPa with the weather; a measured value is better when there is one.
 */
export const SEA_LEVEL_KPA = 101.325;
/** Range accepted (m): the Dead Sea shore to well above any engine room; the troposphere reaches 11,000 m. */
export const ELEVATION_MIN_M = -500;
export const ELEVATION_MAX_M = 9000;

export function standardAtmosphereKpa(elevationM: number): number {
  if (!Number.isFinite(elevationM) || elevationM < ELEVATION_MIN_M || elevationM > ELEVATION_MAX_M) {
    throw new RangeError(`elevation must be between ${ELEVATION_MIN_M} and ${ELEVATION_MAX_M} m, got ${elevationM}`);
  }
  return SEA_LEVEL_KPA * Math.pow(1 - 2.25577e-5 * elevationM, 5.25588);
}
