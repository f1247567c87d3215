/**
 * Calculator routes against outside values (the same the shared tests use), through HTTP:
 * - Lange's Handbook of Chemistry, 15th ed. (1999), table 5.13: propylene glycol by volume;
 * - ASHRAE Handbook - Fundamentals (2009), ch. 31, table 4: ethylene glycol by mass;
 * - IAPWS-IF97 region 4 check values: Tsat(0.1 MPa) = 372.755919 K, Tsat(1 MPa) = 453.035632 K;
 * - SCA limits 1.2 to 3.0 units/US gal and one US pint per 4 US gal when low: common practice (not a published standard);
 * - NIST SP 811 appendix B: 1 US gal = 3.785411784 L, 1 US pint = 0.473176473 L;
 * - ASTM D6210 appendix X1 / D4985 make-up water limits (chloride <= 40 mg/L ...);
 * - mass balance of mixing (C1V1 = C2V2 form), any chemistry textbook.
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const post = (path: string, body: unknown, role: keyof TestApp['tokens'] = 'operator') =>
  request(t.app)
    .post(`/api/calc/${path}`)
    .set(auth(t.tokens[role]))
    .send(body as object);
const GAL = 3.785411784; // NIST SP 811

describe('freeze point and glycol needed', () => {
  it.each([
    [10, -2.2],
    [30, -12.8],
    [50, -33.3],
  ])("PG %d vol %% -> %f °C (Lange's 15th ed., table 5.13)", async (percent, fp) => {
    const res = await post('freeze-point', { glycol: 'propylene', percent, basis: 'volume' }).expect(200);
    expect(res.body.freezePointC).toBeCloseTo(fp, 6);
    expect(res.body.source).toMatch(/Lange/);
  });

  it('EG 50 mass % -> -33.8 °C (ASHRAE Fundamentals 2009, ch. 31, table 4)', async () => {
    const res = await post('freeze-point', { glycol: 'ethylene', percent: 50, basis: 'mass' }).expect(200);
    expect(res.body.freezePointC).toBeCloseTo(-33.8, 6);
  });

  it('a 70 % mix gets the over-concentration warning and no table value beyond the table', async () => {
    const res = await post('freeze-point', { glycol: 'ethylene', percent: 70, basis: 'mass' }).expect(200);
    expect(res.body.freezePointC).toBeNull();
    expect(res.body.warnings.join(' ')).toMatch(/more glycol protects less/);
  });

  it("-12.8 °C needs 30 vol % PG (Lange's table 5.13, inverse)", async () => {
    const res = await post('glycol-for-freeze-point', { glycol: 'propylene', freezePointC: -12.8, basis: 'volume' }).expect(200);
    expect(res.body.percent).toBeCloseTo(30, 4);
  });

  // Contract: 0-60 % for both glycols on both bases. Table ends: ASHRAE 60 mass % EG -48.5 °C; CoolProp 8.0 AEG
  // (ASHRAE fit) 60 vol % EG -52.0 °C; CoolProp 8.0 APG (ASHRAE fit) 60 vol % PG -51.1 °C (computed outside the project).
  it.each([
    ['ethylene', 'mass', 60, -48.5],
    ['ethylene', 'volume', 60, -52.0],
    ['propylene', 'volume', 60, -51.1],
    ['propylene', 'volume', 55, -41.6],
  ])('%s %s %d %% -> %f °C, no warning at 60 %%, and the inverse gives the share back', async (glycol, basis, percent, fp) => {
    const res = await post('freeze-point', { glycol, percent, basis }).expect(200);
    expect(res.body.freezePointC).toBeCloseTo(fp as number, 6);
    expect(res.body.warnings).toEqual([]);
    const inv = await post('glycol-for-freeze-point', { glycol, freezePointC: fp, basis }).expect(200);
    expect(inv.body.percent).toBeCloseTo(percent as number, 4);
  });
  it('every glycol and basis answers a freeze point from 0 to 60 %', async () => {
    for (const glycol of ['ethylene', 'propylene']) {
      for (const basis of ['volume', 'mass']) {
        for (const percent of [0, 15, 35, 52.5, 60]) {
          const res = await post('freeze-point', { glycol, percent, basis }).expect(200);
          expect(typeof res.body.freezePointC).toBe('number');
        }
      }
    }
  });
  it('PG 60 mass % (59.1 vol % by the CRC densities) lies near the CoolProp 8.0 MPG (Melinder) value -50.0 °C (within 2 K)', async () => {
    const res = await post('freeze-point', { glycol: 'propylene', percent: 60, basis: 'mass' }).expect(200);
    expect(Math.abs(res.body.freezePointC - -50.003)).toBeLessThan(2);
  });
  it('above 60 % the answer warns that protection gets worse', async () => {
    const res = await post('freeze-point', { glycol: 'propylene', percent: 60.5, basis: 'mass' }).expect(200);
    expect(res.body.warnings.join(' ')).toMatch(/more glycol protects less/);
    const inv = await post('glycol-for-freeze-point', { glycol: 'ethylene', freezePointC: -51, basis: 'mass' }).expect(200);
    expect(inv.body.percent).toBeGreaterThan(60);
    expect(inv.body.warnings.join(' ')).toMatch(/more glycol protects less/);
  });

  it('beyond the table names freezePointC (the API field, not the library one)', async () => {
    const res = await post('glycol-for-freeze-point', { glycol: 'propylene', freezePointC: -60, basis: 'volume' }).expect(400);
    expect(res.body.field).toBe('freezePointC');
  });
});

describe('boiling point at cap pressure', () => {
  it('water at 0.1 MPa absolute (-1.325 kPa gauge) -> IAPWS-IF97 Tsat 372.755919 K', async () => {
    const res = await post('boiling-point', { gaugePressureKpa: -1.325, glycol: 'ethylene', percent: 0, basis: 'volume' }).expect(200);
    expect(res.body.boilingPointC + 273.15).toBeCloseTo(372.755919, 5);
  });
  it('water at 1 MPa absolute -> IAPWS-IF97 Tsat 453.035632 K', async () => {
    const res = await post('boiling-point', { gaugePressureKpa: 1000 - 101.325, glycol: 'propylene', percent: 0, basis: 'mass' }).expect(200);
    expect(res.body.boilingPointC + 273.15).toBeCloseTo(453.035632, 5);
  });
  it('a 50 % mix under a 100 kPa cap boils above water at 1 atm and above the same mix open (physics: Raoult + pressure)', async () => {
    const capped = (await post('boiling-point', { gaugePressureKpa: 100, glycol: 'ethylene', percent: 50, basis: 'volume' }).expect(200)).body.boilingPointC;
    const open = (await post('boiling-point', { gaugePressureKpa: 0, glycol: 'ethylene', percent: 50, basis: 'volume' }).expect(200)).body.boilingPointC;
    expect(open).toBeGreaterThan(100);
    expect(capped - open).toBeGreaterThan(15); // about 1.5 °C per psi (14.5 psi) rule of thumb, common practice
    expect(capped - open).toBeLessThan(30);
  });
});

describe('boiling point at altitude (ICAO Doc 7488 standard atmosphere)', () => {
  it('elevationM 1,500 m: 84.56 kPa (ICAO check value); a 50 % mix under 100 kPa boils at about 126.7 °C instead of 129.5 °C', async () => {
    const body = { gaugePressureKpa: 100, glycol: 'ethylene', percent: 50, basis: 'volume' };
    const high = (await post('boiling-point', { ...body, elevationM: 1500 }).expect(200)).body;
    expect(high.atmosphereKpa).toBeCloseTo(84.56, 2);
    expect(high.absolutePressureKpa).toBeCloseTo(184.56, 2);
    expect(high.atmosphereSource).toMatch(/ICAO/);
    const sea = (await post('boiling-point', body).expect(200)).body;
    expect(sea.atmosphereKpa).toBe(101.325);
    expect(sea.boilingPointC).toBeCloseTo(129.5, 1);
    expect(high.boilingPointC).toBeCloseTo(126.7, 1);
    // the same as giving the pressure directly
    const given = (await post('boiling-point', { ...body, atmosphereKpa: high.atmosphereKpa }).expect(200)).body;
    expect(given.boilingPointC).toBeCloseTo(high.boilingPointC, 9);
  });
  it('refuses both at once, and an elevation outside -500..9000 m, naming the field', async () => {
    const body = { gaugePressureKpa: 100, glycol: 'ethylene', percent: 50 };
    expect((await post('boiling-point', { ...body, elevationM: 1500, atmosphereKpa: 90 }).expect(400)).body.field).toBe('elevationM');
    expect((await post('boiling-point', { ...body, elevationM: 20000 }).expect(400)).body.field).toBe('elevationM');
  });
});

describe('additive decision through the route: the table at and around 1.2 and 3.0 (common practice)', () => {
  const capacityL = 20 * GAL; // 20 US gal
  it.each([
    [1.19, 'low', 'charged'],
    [1.2, 'in-range', 'charged'],
    [1.21, 'in-range', 'charged'],
    [2.99, 'in-range', 'charged'],
    [3.0, 'in-range', 'charged'],
    [3.01, 'high', 'blank'],
  ])('conventional %f units/US gal -> %s, %s filter', async (sca, status, filter) => {
    const res = await post('additive', { coolantFamily: 'conventional', scaUnitsPerGal: sca, capacityL }).expect(200);
    expect(res.body).toMatchObject({ status, filter });
    expect(res.body.reasons.length).toBeGreaterThan(0);
    expect(res.body.scaUnitsPerLitre).toBeCloseTo(sca / GAL, 9); // NIST SP 811 gallon
    expect(res.body.liquidAdditiveL).toBe(status === 'low' ? 2.35 : 0); // 5 US pints = 2.366 L, to 0.05 L -> 2.35
    expect(res.body.coolantCautions.map((c: { id: string }) => c.id)).toContain('hot-pressure');
  });
  it.each([1.19, 1.2, 3.0, 3.01])('extended-life %f units/US gal -> not-applicable, saying why', async (sca) => {
    const res = await post('additive', { coolantFamily: 'extended-life', scaUnitsPerGal: sca, capacityL }).expect(200);
    expect(res.body).toMatchObject({ status: 'not-applicable', filter: null, liquidAdditiveL: 0 });
    expect(res.body.reasons.join(' ')).toMatch(/test strips do not measure/);
  });
  it('low dose for 4 US gal is one US pint (0.473 L) to 0.05 L: 0.45 L (common practice; NIST SP 811 pint)', async () => {
    const res = await post('additive', { coolantFamily: 'conventional', scaUnitsPerGal: 0.5, capacityL: 4 * GAL }).expect(200);
    expect(res.body.liquidAdditiveL).toBe(0.45);
  });
});

describe('mix correction, make-up water, initial charge', () => {
  it('100 L from 40 % to 50 % with pure glycol: drain and add 16.67 L (mass balance)', async () => {
    const res = await post('mix-correction', { capacityL: 100, measuredPercent: 40, targetPercent: 50 }).expect(200);
    expect(res.body.refill).toBe('glycol');
    expect(res.body.drainL).toBeCloseTo(100 / 6, 6);
    expect(res.body.resultingPercent).toBeCloseTo(50, 9);
  });
  it('a premix equal to the target: drain completely and refill with premix; the additive dilution and its dose (mass balance, NIST SP 811 gallon)', async () => {
    const res = await post('mix-correction', {
      capacityL: 100,
      measuredPercent: 40,
      targetPercent: 50,
      premixPercent: 50,
      scaUnitsPerGal: 2,
      liquidUnitsPerLitre: 10,
    }).expect(200);
    expect(res.body.fullDrain).toBe(true);
    expect(res.body.drainL).toBe(100);
    expect(res.body.reasons[0]).toMatch(/drain the system completely/);
    // all 100 L replaced: 2 units/gal x 26.417 gal = 52.83 units; / 10 units/L = 5.283 L -> 5.30 L
    expect(res.body.additive.restoreUnits).toBeCloseTo(2 * (100 / GAL), 6);
    expect(res.body.additive.restoreLiquidL).toBeCloseTo(5.3, 10);
    expect(res.body.reasons.join(' ')).toMatch(/removes 100 % of its additive/);
  });
  it('chloride 41 mg/L fails the 40 mg/L limit (ASTM D6210 X1 / D4985)', async () => {
    const res = await post('make-up-water', { chlorideMgL: 41, sulfateMgL: 50, hardnessMgLCaCO3: 100, tdsMgL: 200, pH: 7 }).expect(200);
    expect(res.body.verdict).toBe('not-acceptable');
    const ok = await post('make-up-water', { chlorideMgL: 40, sulfateMgL: 100, hardnessMgLCaCO3: 170, tdsMgL: 340, pH: 9 }).expect(200);
    expect(ok.body.verdict).toBe('acceptable');
  });
  it('initial charge: 10 US gal to 1.2 units/gal = 12 units; filter gives 4, liquid at 10 units/L -> 0.8 L (arithmetic of the definitions)', async () => {
    const res = await post('initial-charge', { capacityL: 10 * GAL, filterPrechargeUnits: 4, liquidUnitsPerLitre: 10 }).expect(200);
    expect(res.body.liquidL).toBeCloseTo(0.8, 9);
    expect(res.body.expectedUnitsPerGal).toBeCloseTo(1.2, 9);
  });
  it('initial charge without a strength and no additive profile: 400 naming liquidUnitsPerLitre', async () => {
    const res = await post('initial-charge', { capacityL: 100 }).expect(400);
    expect(res.body.field).toBe('liquidUnitsPerLitre');
  });
  it('the additive profile set by an admin supplies the strength', async () => {
    await request(t.app).put('/api/additive-profile').set(auth(t.tokens.technician)).send({ name: 'x', liquidUnitsPerLitre: 10, filterSizes: [] }).expect(403);
    await request(t.app)
      .put('/api/additive-profile')
      .set(auth(t.tokens.admin))
      .send({ name: 'Shop liquid', liquidUnitsPerLitre: 10, filterSizes: [{ label: 'Small', prechargeUnits: 4 }] })
      .expect(200);
    const res = await post('initial-charge', { capacityL: 10 * GAL, filterPrechargeUnits: 4 }).expect(200);
    expect(res.body.liquidL).toBeCloseTo(0.8, 9);
    await t.ctx.models.AdditiveProfile.destroy({ where: {} });
  });
});

describe('bad input is 400 naming the field', () => {
  it.each([
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: -0.5, capacityL: 80 }, 'scaUnitsPerGal'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 'two', capacityL: 80 }, 'scaUnitsPerGal'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: -80 }, 'capacityL'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 0 }, 'capacityL'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 1e7 }, 'capacityL'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: '80' }, 'capacityL'],
    ['additive', { coolantFamily: 'mystery', scaUnitsPerGal: 2, capacityL: 80 }, 'coolantFamily'],
    ['additive', { coolantFamily: 'conventional', scaUnitsPerGal: 2, capacityL: 80, brand: 'x' }, 'brand'],
    ['freeze-point', { glycol: 'propylene', percent: -1, basis: 'volume' }, 'percent'],
    ['freeze-point', { glycol: 'propylene', percent: 'abc', basis: 'volume' }, 'percent'],
    ['freeze-point', { glycol: 'methanol', percent: 30, basis: 'volume' }, 'glycol'],
    ['freeze-point', { glycol: 'propylene', percent: 30, basis: 'weight' }, 'basis'],
    ['boiling-point', { gaugePressureKpa: -200, glycol: 'ethylene', percent: 50 }, 'gaugePressureKpa'],
    ['boiling-point', { gaugePressureKpa: 100, glycol: 'ethylene', percent: 95 }, 'percent'],
    ['mix-correction', { capacityL: 100, measuredPercent: 40, targetPercent: 50, premixPercent: 45 }, 'premixPercent'],
    ['mix-correction', { capacityL: 20000, measuredPercent: 40, targetPercent: 50 }, 'capacityL'],
    ['mix-correction', { capacityL: 400, measuredPercent: 30, targetPercent: 100 }, 'targetPercent'],
    ['mix-correction', { capacityL: 400, measuredPercent: 30, targetPercent: 60.5 }, 'targetPercent'],
    ['make-up-water', { pH: 15 }, 'pH'],
    ['initial-charge', { capacityL: 100, liquidUnitsPerLitre: -3 }, 'liquidUnitsPerLitre'],
  ])('%s %j -> field %s', async (path, body, field) => {
    const res = await post(path, body).expect(400);
    expect(res.body.field).toBe(field);
    expect(typeof res.body.error).toBe('string');
  });
  it('no token: 401', async () => {
    await request(t.app).post('/api/calc/freeze-point').send({ glycol: 'propylene', percent: 30 }).expect(401);
  });
  it('is in the OpenAPI document', async () => {
    const res = await request(t.app).get('/api/openapi.json').expect(200);
    expect(Object.keys(res.body.paths)).toEqual(
      expect.arrayContaining(['/api/calc/additive', '/api/calc/boiling-point', '/api/coolant-tests/import', '/api/due-list']),
    );
  });
});
