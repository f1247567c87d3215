import { fitCooling, timeToReachS, coolingTemperature, lumpedTimeConstantS, biotNumber } from '../../../shared/cooling/newton-cooling';

describe('lumped capacitance against a textbook worked example', () => {
  // Incropera, DeWitt, Bergman & Lavine, Fundamentals of Heat and Mass Transfer (6th ed., 2007),
  // Example 5.1: thermocouple junction (sphere), h = 400 W/m²K, k = 20 W/m·K, c = 400 J/kg·K,
  // rho = 8500 kg/m³. Diameter for a time constant of 1 s; time to go from 25 °C to 199 °C in a
  // 200 °C gas stream. Printed answers: D = 7.06e-4 m, Bi = 2.35e-3, t = 5.2 s (about 5 tau).
  // The example's data and answers are recalled from memory, not re-read from the book.
  const h = 400,
    k = 20,
    c = 400,
    rho = 8500;
  const D = (6 * h * 1) / (rho * c); // from tau = rho c D / (6 h) = 1 s

  it('junction diameter for tau = 1 s: 7.06e-4 m (book: 7.06 x 10^-4 m)', () => {
    expect(D).toBeCloseTo(7.06e-4, 6);
    const r = D / 2;
    const tau = lumpedTimeConstantS({ densityKgM3: rho, specificHeatJkgK: c, volumeM3: (4 / 3) * Math.PI * r ** 3, areaM2: 4 * Math.PI * r ** 2, hWm2K: h });
    expect(tau).toBeCloseTo(1, 12);
  });

  it('Biot number h(D/6)/k = 2.35e-3, so the lumped model is valid (book: 2.35 x 10^-3)', () => {
    expect(biotNumber(h, D / 6, k)).toBeCloseTo(2.35e-3, 5);
  });

  it('time to reach 199 °C from 25 °C in 200 °C gas: 5.2 s (book: t = 5.2 s ≈ 5 tau)', () => {
    const t = timeToReachS(25, 200, 1, 199);
    expect(t).toBeCloseTo(5.2, 1); // tau ln(175) = 5.165 s
    expect(coolingTemperature(25, 200, 1, t)).toBeCloseTo(199, 9);
  });
});

describe('timeToReachS edge cases', () => {
  it('cooling: tau ln((T0-Ta)/(Tth-Ta))', () => {
    expect(timeToReachS(90, 30, 1000, 50)).toBeCloseTo(1000 * Math.log(60 / 20), 9);
  });
  it('threshold at or below the temperature approached: never (Infinity)', () => {
    expect(timeToReachS(90, 55, 1000, 50)).toBe(Infinity); // heater set at 55 °C, limit 50 °C
    expect(timeToReachS(90, 50, 1000, 50)).toBe(Infinity);
  });
  it('already there: 0; bad input: NaN', () => {
    expect(timeToReachS(45, 25, 1000, 50)).toBe(0);
    expect(timeToReachS(90, 25, 0, 50)).toBeNaN();
  });
});

describe('fitCooling on synthetic data with a known tau', () => {
  let seed = 12345;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) % 2147483648;
    return seed / 2147483648 - 0.5;
  }; // uniform ±0.5
  const tau = 2400,
    Ta = 28,
    T0 = 88;
  const samples = Array.from({ length: 121 }, (_, i) => {
    const t = i * 60; // 2 h, a sample a minute
    return { t, temp: coolingTemperature(T0, Ta, tau, t) + 0.6 * noise() }; // ±0.3 °C sensor noise
  });

  it('recovers tau within 3 % with a known ambient, r2 near 1', () => {
    const f = fitCooling(samples, Ta)!;
    expect(Math.abs(f.tauS - tau) / tau).toBeLessThan(0.03);
    expect(f.r2).toBeGreaterThan(0.999);
    expect(f.startC).toBeCloseTo(T0, 0);
    expect(f.ambientFitted).toBe(false);
  });

  it('fits the ambient too when it is not given', () => {
    const f = fitCooling(samples)!;
    expect(f.ambientFitted).toBe(true);
    expect(Math.abs(f.ambientC - Ta)).toBeLessThan(1.5);
    expect(Math.abs(f.tauS - tau) / tau).toBeLessThan(0.08);
  });

  it('exact data gives exact tau', () => {
    const exact = Array.from({ length: 20 }, (_, i) => ({ t: 1000 + i * 100, temp: coolingTemperature(90, 20, 1500, i * 100) }));
    expect(fitCooling(exact, 20)!.tauS).toBeCloseTo(1500, 6);
    expect(fitCooling(exact)!.ambientC).toBeCloseTo(20, 1);
  });

  it('refuses data that does not approach a steady temperature', () => {
    expect(
      fitCooling([
        { t: 0, temp: 80 },
        { t: 60, temp: 80 },
      ]),
    ).toBeNull();
    expect(
      fitCooling(
        [0, 1, 2, 3].map((i) => ({ t: i * 60, temp: 60 + i })),
        25,
      ),
    ).toBeNull(); // warming away from 25
    expect(fitCooling([0, 1, 2].map((i) => ({ t: i, temp: 50 })))).toBeNull();
  });
});
