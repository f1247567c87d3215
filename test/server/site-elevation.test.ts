/**
 * A site's elevation (m above mean sea level) through PATCH /api/sites/:id, and what the rules make of it:
 * the boiling-margin rule uses the ICAO standard atmosphere (ICAO Doc 7488) at that elevation.
 */
import request from 'supertest';
import { EngineEvaluator, type EngineFacts, type EvalReading } from '../../server/services/alarms/engine-evaluator';
import { DEFAULT_RULES } from '../../server/services/alarms/rule-definitions';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(async () => t.close());

it('PATCH /api/sites/:id accepts elevationM (or null), refuses bad values naming the field', async () => {
  const site = (await request(t.app).post('/api/sites').set(auth(t.tokens.admin)).send({ name: 'Mesa pump house', timeZone: 'America/Denver' }).expect(201))
    .body;
  const patched = (await request(t.app).patch(`/api/sites/${site.id}`).set(auth(t.tokens.admin)).send({ elevationM: 1500 }).expect(200)).body;
  expect(patched).toMatchObject({ id: site.id, elevationM: 1500, timeZone: 'America/Denver' });
  const listed = (await request(t.app).get('/api/sites').set(auth(t.tokens.operator)).expect(200)).body.find((s: { id: number }) => s.id === site.id);
  expect(listed.elevationM).toBe(1500);
  expect((await request(t.app).patch(`/api/sites/${site.id}`).set(auth(t.tokens.admin)).send({ elevationM: null }).expect(200)).body.elevationM).toBeNull();
  for (const bad of ['high', 12000, -1000]) {
    const res = await request(t.app).patch(`/api/sites/${site.id}`).set(auth(t.tokens.admin)).send({ elevationM: bad }).expect(400);
    expect(res.body.field).toBe('elevationM');
  }
  await request(t.app).patch(`/api/sites/${site.id}`).set(auth(t.tokens.operator)).send({ elevationM: 10 }).expect(403);
});

it('the boiling-margin rule at 1,500 m alarms where it stays quiet at sea level (50 % glycol, 100 kPa, 118 °C)', () => {
  const T0 = Date.UTC(2026, 5, 1);
  const facts = (elevationM: number): EngineFacts => ({
    id: 1,
    glycolType: 'ethylene',
    glycolPercent: 50,
    baselineFrom: T0,
    baselineValue: null,
    duty: 'prime',
    heaterSetpointC: null,
    capPressureKpa: 100,
    elevationM,
  });
  const run = (elevationM: number) => {
    const ev = new EngineEvaluator(facts(elevationM), DEFAULT_RULES);
    const hits = [];
    for (let s = 0; s < 60; s++) {
      const ts = T0 + s * 1000;
      const batch: EvalReading[] = [
        { channel: 'engine_speed', ts, value: 1800, quality: 0 },
        { channel: 'coolant_pressure', ts, value: 100, quality: 0 },
        { channel: 'coolant_temp', ts, value: 118, quality: 0 },
      ];
      hits.push(...ev.feed(batch));
    }
    return hits.filter((h) => h.def.key === 'boiling_margin_low' && h.event.kind === 'raise');
  };
  expect(run(0)).toEqual([]); // boiling point ≈ 129.5 °C: margin 11.5 °C
  expect(run(1500)).toHaveLength(1); // ≈ 126.7 °C: margin 8.7 °C
});
