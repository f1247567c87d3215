/** Saving a shift answers with the overlaps and uncovered hours it leaves at its site (shared/oncall/coverage.ts). */
import request from 'supertest';
import { auth } from './helpers';
import { makeAlarmApp, type AlarmApp } from './support/alarm-app';

let t: AlarmApp;
beforeAll(async () => {
  t = await makeAlarmApp({ tickMs: 1e9 });
});
afterAll(() => t.close());

const H = 3_600_000;
const T0 = Date.UTC(2031, 0, 6); // a Monday, far from any other shift of the test site

describe('on-call coverage in the answer', () => {
  it('a shift on its own leaves the day before and after uncovered; an overlapping one names the overlap', async () => {
    const api = () => request(t.app);
    const siteId = t.siteId;
    const a = (
      await api()
        .post('/api/oncall')
        .set(auth(t.tokens.planner))
        .send({ siteId, userId: t.users.technician.id, backupUserId: null, startsAt: T0, endsAt: T0 + 12 * H })
        .expect(201)
    ).body;
    expect(a.coverage.overlaps).toEqual([]);
    expect(a.coverage.uncovered).toEqual([
      { from: new Date(T0 - 24 * H).toISOString(), to: new Date(T0).toISOString() },
      { from: new Date(T0 + 12 * H).toISOString(), to: new Date(T0 + 36 * H).toISOString() },
    ]);
    const b = (
      await api()
        .post('/api/oncall')
        .set(auth(t.tokens.planner))
        .send({ siteId, userId: t.users.backup.id, backupUserId: null, startsAt: T0 + 10 * H, endsAt: T0 + 24 * H })
        .expect(201)
    ).body;
    expect(b.coverage.overlaps).toEqual([
      { shiftId: a.id, userId: t.users.technician.id, samePerson: false, from: new Date(T0 + 10 * H).toISOString(), to: new Date(T0 + 12 * H).toISOString() },
    ]);
    // the first shift changed to end when the second starts: no overlap left
    const changed = (
      await api()
        .patch(`/api/oncall/${a.id}`)
        .set(auth(t.tokens.planner))
        .send({ endsAt: T0 + 10 * H })
        .expect(200)
    ).body;
    expect(changed.coverage.overlaps).toEqual([]);
    expect(changed.coverage.uncovered[0]).toEqual({ from: new Date(T0 - 24 * H).toISOString(), to: new Date(T0).toISOString() });
    for (const id of [a.id, b.id]) await api().delete(`/api/oncall/${id}`).set(auth(t.tokens.planner)).expect(204);
  });
});
