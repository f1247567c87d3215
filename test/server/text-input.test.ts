/** Control characters and text-direction overrides in any free-text field: 400 naming the field, never 500. */
import request from 'supertest';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

describe('bad characters in text', () => {
  it('sign-in with a NUL in the e-mail answers 400 naming email, not 500', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: 'admin\u0000@example.test', password: PASSWORD }).expect(400);
    expect(res.body.field).toBe('email');
  });

  it.each([
    ['right-to-left override', 'Pump house \u202Egnp.exe'],
    ['left-to-right isolate', 'North \u2066yard'],
    ['NUL', 'Yard\u0000B'],
    ['escape', 'Yard \u001b[31mB'],
    ['C1 control', 'Yard \u0085B'],
  ])('a site name with a %s is refused with 400 naming name', async (_what, name) => {
    const res = await request(t.app).post('/api/sites').set(auth(t.tokens.admin)).send({ name, timeZone: 'UTC' }).expect(400);
    expect(res.body.field).toBe('name');
    expect(res.body.error).toMatch(/control characters|text-direction/);
  });

  it('a user name with an override is refused; nested fields are named by their path', async () => {
    const res = await request(t.app)
      .post('/api/users')
      .set(auth(t.tokens.admin))
      .send({ email: 'rtl@example.test', name: 'Eve \u202Eredlohdna', role: 'operator', password: 'copper-pipe-and-gauge' })
      .expect(400);
    expect(res.body.field).toBe('name');
  });

  it('ordinary text with accents, tabs and new lines is accepted', async () => {
    const res = await request(t.app)
      .post('/api/sites')
      .set(auth(t.tokens.admin))
      .send({ name: 'Usine Saint-Étienne – Nord', timeZone: 'Europe/Paris' })
      .expect(201);
    expect(res.body.name).toBe('Usine Saint-Étienne – Nord');
  });
});
