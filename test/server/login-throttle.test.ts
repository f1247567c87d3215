/**
 * Sign-in throttling per address and per account, X-Forwarded-For only with TRUST_PROXY, and the
 * password rules for people (length, 72-byte bcrypt limit, common, e-mail, product name).
 */
import path from 'node:path';
import request from 'supertest';
import { createApp } from '../../server/app';
import { LOGIN_LIMITS } from '../../server/auth/login-limit';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(() => t.close());

const appWith = (trustProxy: boolean | string) =>
  createApp({ ...t.ctx, config: { ...t.ctx.config, trustProxy } }, { staticDir: path.join(t.dataDir, 'no-app') });

describe('sign-in throttling', () => {
  it('refuses with 429 after many wrong passwords over different e-mails from one address (spraying)', async () => {
    const app = appWith(false);
    for (let i = 0; i < LOGIN_LIMITS.address; i++) {
      await request(app)
        .post('/api/auth/login')
        .send({ email: `person${i}@example.test`, password: 'Winter-2026!!' })
        .expect(401);
    }
    const res = await request(app).post('/api/auth/login').send({ email: 'person-next@example.test', password: 'Winter-2026!!' }).expect(429);
    expect(res.body.error).toMatch(/too many/);
    // the good password from that address waits too: the limit is per address
    await request(app).post('/api/auth/login').send({ email: 'admin@example.test', password: PASSWORD }).expect(429);
  });

  it('ignores X-Forwarded-For without TRUST_PROXY: a client cannot pick a fresh bucket', async () => {
    const app = appWith(false);
    for (let i = 0; i < LOGIN_LIMITS.address; i++) {
      await request(app)
        .post('/api/auth/login')
        .set('X-Forwarded-For', `203.0.113.${i + 1}`)
        .send({ email: `xff${i}@example.test`, password: 'Winter-2026!!' })
        .expect(401);
    }
    await request(app)
      .post('/api/auth/login')
      .set('X-Forwarded-For', '198.51.100.77')
      .send({ email: 'xff-last@example.test', password: 'Winter-2026!!' })
      .expect(429);
  });

  it('with TRUST_PROXY the forwarded address counts: one address is throttled, another signs in', async () => {
    const app = appWith('loopback');
    for (let i = 0; i < LOGIN_LIMITS.address; i++) {
      await request(app)
        .post('/api/auth/login')
        .set('X-Forwarded-For', '203.0.113.9')
        .send({ email: `tp${i}@example.test`, password: 'Winter-2026!!' })
        .expect(401);
    }
    await request(app)
      .post('/api/auth/login')
      .set('X-Forwarded-For', '203.0.113.9')
      .send({ email: 'tp-last@example.test', password: 'Winter-2026!!' })
      .expect(429);
    await request(app).post('/api/auth/login').set('X-Forwarded-For', '198.51.100.10').send({ email: 'admin@example.test', password: PASSWORD }).expect(200);
  });

  it('limits one account guessed from many addresses', async () => {
    const app = appWith('loopback');
    for (let i = 0; i < LOGIN_LIMITS.account; i++) {
      await request(app)
        .post('/api/auth/login')
        .set('X-Forwarded-For', `192.0.2.${i + 1}`)
        .send({ email: 'technician@example.test', password: `guess-number-${i}` })
        .expect(401);
    }
    await request(app)
      .post('/api/auth/login')
      .set('X-Forwarded-For', '192.0.2.200')
      .send({ email: 'technician@example.test', password: 'guess-number-x' })
      .expect(429);
  });
});

describe('sign-in input', () => {
  it('a password over 72 bytes is refused with 400 naming it, never truncated into a match', async () => {
    const long = PASSWORD + 'x'.repeat(80 - PASSWORD.length);
    const res = await request(t.app).post('/api/auth/login').send({ email: 'planner@example.test', password: long }).expect(400);
    expect(res.body.field).toBe('password');
  });
});

describe('password rules for people', () => {
  const create = (password: string, email = 'new.person@example.test') =>
    request(t.app).post('/api/users').set(auth(t.tokens.admin)).send({ email, name: 'New person', role: 'technician', password });

  it.each([
    ['aaaaaaaaaaaa', /common|easy/],
    ['1234567890', /at least 12/],
    ['123456789012', /common|easy/],
    ['abcabcabcabc', /common|easy/],
    ['password1234', /common|easy/],
    ['my-jacketwatch-pass', /product name/],
    ['ü'.repeat(37), /72 bytes/], // 74 bytes in UTF-8, 37 characters
  ])('refuses %j with 400 naming password', async (password, why) => {
    const res = await create(password).expect(400);
    expect(res.body.field).toBe('password');
    expect(res.body.error).toMatch(why);
  });

  it('refuses the e-mail as password, on create and on reset', async () => {
    const res = await create('new.person@example.test').expect(400);
    expect(res.body.error).toMatch(/e-mail/);
    const reset = await request(t.app)
      .patch(`/api/users/${t.userIds.operator}`)
      .set(auth(t.tokens.admin))
      .send({ password: 'operator@example.test' })
      .expect(400);
    expect(reset.body.field).toBe('password');
  });

  it('accepts a long uncommon password', async () => {
    await create('brass-valve-under-the-stairs').expect(201);
  });
});
