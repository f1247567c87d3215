/**
 * Idempotency keys on work-order writes (the offline queue of the technician's app sends each queued
 * change with one): a retry with the same key gets the first answer again and changes nothing, on
 * the real database (SQLite, or PostgreSQL with JW_TEST_PG_URL). The header follows the IETF draft
 * "The Idempotency-Key HTTP Header Field" (draft-ietf-httpapi-idempotency-key-header).
 */
import request from 'supertest';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
let engineId: number;
const JPEG = Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10]), Buffer.from('JFIF\0'), Buffer.alloc(200, 1), Buffer.from([0xff, 0xd9])]);

beforeAll(async () => {
  t = await makeTestApp();
  const siteId = (await t.ctx.models.Site.create({ name: 'Test site', timeZone: 'UTC' })).id;
  engineId = (
    await t.ctx.models.Engine.create({
      siteId,
      name: 'Pump engine',
      duty: 'standby',
      capacityL: 60,
      coolantFamily: 'conventional',
      glycolType: 'ethylene',
      glycolPercent: 50,
      capPressureKpa: 100,
      oilDrainIntervalH: 250,
      runHours: 10,
    })
  ).id;
});
afterAll(() => t.close());

const as = (role: 'planner' | 'technician' | 'operator') => auth(t.tokens[role]);

async function startedOrder(): Promise<{ id: number; steps: Array<{ id: number; key: string }> }> {
  const res = await request(t.app)
    .post('/api/work-orders')
    .set(as('planner'))
    .send({ engineId, kind: 'filter-change', assigneeId: t.userIds.technician })
    .expect(201);
  await request(t.app).post(`/api/work-orders/${res.body.id}/transition`).set(as('technician')).send({ to: 'in-progress' }).expect(200);
  return res.body;
}

describe('Idempotency-Key on work-order writes', () => {
  it('a completed step sent twice with one key is done once; the retry gets the same answer', async () => {
    const o = await startedOrder();
    const step = o.steps.find((s) => s.key === 'fit-filter')!;
    const send = () =>
      request(t.app)
        .post(`/api/work-orders/${o.id}/steps/${step.id}/complete`)
        .set(as('technician'))
        .set('Idempotency-Key', `complete-${o.id}-a1b2c3`)
        .send({ value: 0.75, unit: 'turns', note: 'by hand' });
    const first = await send().expect(200);
    const again = await send().expect(200);
    expect(first.headers['idempotent-replayed']).toBeUndefined();
    expect(again.headers['idempotent-replayed']).toBe('true');
    expect(again.body).toEqual(first.body);
    const done = await t.ctx.models.WorkOrderEvent.count({ where: { workOrderId: o.id, event: 'step-done' } });
    expect(done).toBe(1);
    // without a key the same request is a second one, refused as today
    await request(t.app).post(`/api/work-orders/${o.id}/steps/${step.id}/complete`).set(as('technician')).send({ value: 0.75, unit: 'turns' }).expect(409);
  });

  it('a photo sent twice with one key is stored once', async () => {
    const o = await startedOrder();
    const send = () =>
      request(t.app)
        .post(`/api/work-orders/${o.id}/attachments`)
        .set(as('technician'))
        .set('Idempotency-Key', `photo-${o.id}-9f8e7d`)
        .attach('file', JPEG, { filename: 'filter.jpg', contentType: 'image/jpeg' });
    const a = await send().expect(201);
    const b = await send().expect(201);
    expect(b.body.id).toBe(a.body.id);
    expect(await t.ctx.models.Attachment.count({ where: { workOrderId: o.id } })).toBe(1);
  });

  it('a refusal (order cancelled meanwhile) is kept and replayed too; the key is per user and per request', async () => {
    const o = await startedOrder();
    const step = o.steps.find((s) => s.key === 'fit-filter')!;
    await request(t.app).post(`/api/work-orders/${o.id}/transition`).set(as('planner')).send({ to: 'cancelled', note: 'engine replaced' }).expect(200);
    const key = `draft-${o.id}-77aa66`;
    const send = () =>
      request(t.app).patch(`/api/work-orders/${o.id}/steps/${step.id}`).set(as('technician')).set('Idempotency-Key', key).send({ note: 'typed offline' });
    const r1 = await send().expect(409);
    const r2 = await send().expect(409);
    expect(r2.body).toEqual(r1.body);
    expect(r2.headers['idempotent-replayed']).toBe('true');
    // the same key on another request of the same user: refused, nothing done
    await request(t.app).post(`/api/work-orders/${o.id}/amendments`).set(as('technician')).set('Idempotency-Key', key).send({ text: 'x' }).expect(422);
    // the same key from another user is that user's own
    const other = await request(t.app)
      .patch(`/api/work-orders/${o.id}/steps/${step.id}`)
      .set(as('operator'))
      .set('Idempotency-Key', key)
      .send({ note: 'typed offline' });
    expect(other.headers['idempotent-replayed']).toBeUndefined();
  });

  it('a malformed key is refused with a clear error', async () => {
    const o = await startedOrder();
    const res = await request(t.app)
      .post(`/api/work-orders/${o.id}/amendments`)
      .set(as('technician'))
      .set('Idempotency-Key', 'bad key!')
      .send({ text: 'x' })
      .expect(400);
    expect(res.body.field).toBe('Idempotency-Key');
  });
});
