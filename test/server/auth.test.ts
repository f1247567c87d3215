import request from 'supertest';
import { makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
});
afterAll(() => t.close());

describe('POST /api/auth/login', () => {
  it('signs in with the right password and returns token and user without the hash', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: 'Planner@Example.test ', password: PASSWORD }).expect(200);
    expect(res.body.user).toEqual({ id: t.userIds.planner, email: 'planner@example.test', name: 'Test planner', role: 'planner' });
    expect(res.body.user.passwordHash).toBeUndefined();
    const me = await request(t.app).get('/api/auth/me').set('Authorization', `Bearer ${res.body.token}`).expect(200);
    expect(me.body.email).toBe('planner@example.test');
  });

  it('refuses a wrong password and an unknown e-mail alike with 401', async () => {
    const a = await request(t.app).post('/api/auth/login').send({ email: 'technician@example.test', password: 'wrong-password' }).expect(401);
    const b = await request(t.app).post('/api/auth/login').send({ email: 'nobody@example.test', password: 'wrong-password' }).expect(401);
    expect(a.body.error).toBe(b.body.error);
  });

  it('names the missing field', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: 'admin@example.test' }).expect(400);
    expect(res.body.field).toBe('password');
  });

  it('refuses a disabled account', async () => {
    await t.ctx.models.User.update({ disabled: true }, { where: { id: t.userIds.operator } });
    await request(t.app).post('/api/auth/login').send({ email: 'operator@example.test', password: PASSWORD }).expect(401);
    await t.ctx.models.User.update({ disabled: false }, { where: { id: t.userIds.operator } });
  });

  it('allows many successful sign-ins but blocks after 10 failures for that e-mail', async () => {
    for (let i = 0; i < 15; i++) await request(t.app).post('/api/auth/login').send({ email: 'planner@example.test', password: PASSWORD }).expect(200);
    for (let i = 0; i < 10; i++) await request(t.app).post('/api/auth/login').send({ email: 'planner@example.test', password: 'nope-nope' }).expect(401);
    const blocked = await request(t.app).post('/api/auth/login').send({ email: 'planner@example.test', password: PASSWORD }).expect(429);
    expect(blocked.body.error).toMatch(/too many/);
    // other accounts from the same address are not locked out
    await request(t.app).post('/api/auth/login').send({ email: 'admin@example.test', password: PASSWORD }).expect(200);
  });
});
