import { boilingPointC } from '../../shared/coolant/boiling-point';
import { SEA_LEVEL_KPA, standardAtmosphereKpa } from '../../shared/atmosphere';

describe('standard atmosphere (ICAO Doc 7488, Manual of the ICAO Standard Atmosphere)', () => {
  it('sea level is 101.325 kPa; 1,500 m gives 84.56 kPa (check value of the ICAO troposphere formula)', () => {
    expect(standardAtmosphereKpa(0)).toBe(SEA_LEVEL_KPA);
    expect(standardAtmosphereKpa(1500)).toBeCloseTo(84.56, 2);
  });

  it('falls with height and refuses elevations outside -500..9000 m', () => {
    expect(standardAtmosphereKpa(3000)).toBeLessThan(standardAtmosphereKpa(1500));
    expect(() => standardAtmosphereKpa(12000)).toThrow(RangeError);
    expect(() => standardAtmosphereKpa(Number.NaN)).toThrow(RangeError);
  });

  it('at 1,500 m a 50 % ethylene glycol mix under a 100 kPa gauge cap boils about 3 °C lower than at sea level', () => {
    // boiling point: IAPWS-IF97 saturation + Raoult (shared/coolant/boiling-point.ts), absolute = gauge + ICAO pressure
    const sea = boilingPointC(100, 'ethylene', 50, 'volume');
    const high = boilingPointC(100, 'ethylene', 50, 'volume', standardAtmosphereKpa(1500));
    expect(sea - high).toBeGreaterThan(2.5);
    expect(sea - high).toBeLessThan(3.5);
  });
});
