/**
 * The browser's session as an httpOnly cookie: set by a cookie sign-in, accepted by HTTP and the
 * socket.io handshake, refused cross-site, cleared by sign-out, ended by the session version like a
 * bearer token; and work-order live events limited to the user's sites (two real socket.io clients).
 * HTTP attributes through the app (supertest); sockets against a real server process on real ports.
 */
import bcrypt from 'bcryptjs';
import request from 'supertest';
import { io as ioClient, type Socket } from 'socket.io-client';
import { createApp } from '../../server/app';
import { CSRF_HEADER } from '../../server/auth/session-cookie';
import { auth, makeTestApp, PASSWORD, type TestApp } from './helpers';
import { Db, seedFleet, startServerProcess, type SeededDevice, type ServerProcess } from './support/telemetry-server';
import { until } from './support/until';

const cookieLogin = (app: TestApp['app'], email: string, extra: Record<string, string> = {}) =>
  request(app).post('/api/auth/login').set(CSRF_HEADER, '1').set(extra).send({ email, password: PASSWORD, session: 'cookie' });

/** `name=value` of the session cookie in a Set-Cookie answer. */
function sessionPair(setCookie: string[] | string | undefined): string {
  const line = [setCookie ?? []].flat().find((c) => /^(__Host-)?jw_session=[^;]+/.test(c));
  if (!line) throw new Error(`no session cookie in ${JSON.stringify(setCookie)}`);
  return line.split(';')[0];
}

describe('cookie session over HTTP', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  test('a cookie sign-in sets an httpOnly SameSite=Strict cookie (not Secure over plain HTTP) and keeps the token out of the answer', async () => {
    const res = await cookieLogin(t.app, 'operator@example.test').expect(200);
    expect(res.body).toEqual({ user: expect.objectContaining({ email: 'operator@example.test', role: 'operator' }) });
    expect(res.body.token).toBeUndefined();
    const line = [res.headers['set-cookie']].flat()[0] as string;
    expect(line).toMatch(/^jw_session=/);
    expect(line).toMatch(/; HttpOnly/i);
    expect(line).toMatch(/; SameSite=Strict/i);
    expect(line).toMatch(/; Path=\//i);
    expect(line).not.toMatch(/; Secure/i);
    // the cookie alone signs the browser in: who is signed in comes from /api/auth/me
    const me = await request(t.app).get('/api/auth/me').set('cookie', sessionPair(res.headers['set-cookie'])).expect(200);
    expect(me.body).toMatchObject({ email: 'operator@example.test', role: 'operator' });
  });

  test('an API client still gets a bearer token, and no cookie', async () => {
    const res = await request(t.app).post('/api/auth/login').send({ email: 'planner@example.test', password: PASSWORD }).expect(200);
    expect(typeof res.body.token).toBe('string');
    expect(res.headers['set-cookie']).toBeUndefined();
    await request(t.app).get('/api/auth/me').set(auth(res.body.token)).expect(200);
  });

  test('Secure (and the __Host- name) when the request came over TLS through a proxy named by TRUST_PROXY; not when the header is not trusted', async () => {
    const behindProxy = createApp({ ...t.ctx, config: { ...t.ctx.config, trustProxy: 'loopback' } }, { staticDir: '/nonexistent' });
    const tls = await cookieLogin(behindProxy, 'technician@example.test', { 'x-forwarded-proto': 'https' }).expect(200);
    const line = [tls.headers['set-cookie']].flat()[0] as string;
    expect(line).toMatch(/^__Host-jw_session=/);
    expect(line).toMatch(/; Secure/i);
    expect(line).toMatch(/; HttpOnly/i);
    expect(line).toMatch(/; SameSite=Strict/i);
    // the default app trusts no proxy: a client's own X-Forwarded-Proto does not make the cookie Secure
    const spoofed = await cookieLogin(t.app, 'technician@example.test', { 'x-forwarded-proto': 'https' }).expect(200);
    expect([spoofed.headers['set-cookie']].flat()[0]).not.toMatch(/; Secure/i);
  });

  test('cross-site protection: a change made with the cookie needs the request header and a same-origin request', async () => {
    const cookie = sessionPair((await cookieLogin(t.app, 'admin@example.test').expect(200)).headers['set-cookie']);
    const site = { name: 'Cookie site', timeZone: 'UTC' };
    // no header (what a form or a script of another site could send)
    const bare = await request(t.app).post('/api/sites').set('cookie', cookie).send(site).expect(403);
    expect(bare.body.error).toMatch(new RegExp(CSRF_HEADER));
    // the browser says it came from another site
    await request(t.app).post('/api/sites').set('cookie', cookie).set(CSRF_HEADER, '1').set('sec-fetch-site', 'cross-site').send(site).expect(403);
    await request(t.app).post('/api/sites').set('cookie', cookie).set(CSRF_HEADER, '1').set('sec-fetch-site', 'same-site').send(site).expect(403);
    // an older browser without Sec-Fetch-Site: the Origin must be this host
    await request(t.app).post('/api/sites').set('cookie', cookie).set(CSRF_HEADER, '1').set('origin', 'http://attacker.example').send(site).expect(403);
    // even a read with the cookie is refused when the browser marks it cross-site
    await request(t.app).get('/api/users').set('cookie', cookie).set('sec-fetch-site', 'cross-site').expect(403);
    // the app's own request
    await request(t.app).post('/api/sites').set('cookie', cookie).set(CSRF_HEADER, '1').set('sec-fetch-site', 'same-origin').send(site).expect(201);
    // a bearer client needs neither (a browser never adds Authorization by itself)
    const token = t.tokens.admin;
    await request(t.app)
      .post('/api/sites')
      .set(auth(token))
      .send({ ...site, name: 'Bearer site' })
      .expect(201);
    // a cookie sign-in from another site is refused too (the attacker's account in the victim's browser)
    await request(t.app).post('/api/auth/login').send({ email: 'admin@example.test', password: PASSWORD, session: 'cookie' }).expect(403);
    await request(t.app)
      .post('/api/auth/login')
      .set(CSRF_HEADER, '1')
      .set('sec-fetch-site', 'cross-site')
      .send({ email: 'admin@example.test', password: PASSWORD, session: 'cookie' })
      .expect(403);
  });

  test('roles hold with the cookie as with a bearer token', async () => {
    for (const [role, status] of [
      ['operator', 403],
      ['technician', 403],
      ['planner', 403],
      ['admin', 200],
    ] as const) {
      const cookie = sessionPair((await cookieLogin(t.app, `${role}@example.test`).expect(200)).headers['set-cookie']);
      await request(t.app).get('/api/users').set('cookie', cookie).expect(status);
    }
    await request(t.app).get('/api/users').set('cookie', 'jw_session=forged.token.value').expect(401);
  });

  test('sign-out clears the cookie', async () => {
    const res = await request(t.app).post('/api/auth/logout').expect(200);
    const lines = [res.headers['set-cookie']].flat() as string[];
    const plain = lines.find((l) => l.startsWith('jw_session=;'));
    expect(plain).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(plain).toMatch(/HttpOnly/i);
    expect(lines.some((l) => l.startsWith('__Host-jw_session=;'))).toBe(true);
  });

  test('the session version ends a cookie session like a bearer one (disable, password reset)', async () => {
    const { User } = t.ctx.models;
    const cookie = sessionPair((await cookieLogin(t.app, 'technician@example.test').expect(200)).headers['set-cookie']);
    await request(t.app).get('/api/auth/me').set('cookie', cookie).expect(200);
    await User.increment({ sessionVersion: 1 }, { where: { id: t.userIds.technician } });
    await request(t.app).get('/api/auth/me').set('cookie', cookie).expect(401);
    const again = sessionPair((await cookieLogin(t.app, 'technician@example.test').expect(200)).headers['set-cookie']);
    await User.update({ disabled: true }, { where: { id: t.userIds.technician } });
    await request(t.app).get('/api/auth/me').set('cookie', again).expect(401);
    await User.update({ disabled: false }, { where: { id: t.userIds.technician } });
  });
});

describe('cookie session on socket.io, and work-order events by site (real server)', () => {
  let server: ServerProcess;
  let db: Db;
  let siteA: SeededDevice;
  let siteB: SeededDevice;
  let adminToken: string;
  const sockets: Socket[] = [];
  const ADMIN_PW = 'lantern-orchard-kettle-58';

  async function api(
    method: string,
    path: string,
    token: string | null,
    body?: unknown,
    headers: Record<string, string> = {},
  ): Promise<{ status: number; body: { token?: string; id?: number; [k: string]: unknown }; setCookie: string[] }> {
    const res = await fetch(server.url + path, {
      method,
      headers: { 'content-type': 'application/json', ...(token ? { authorization: `Bearer ${token}` } : {}), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await res.text();
    return { status: res.status, body: text ? JSON.parse(text) : null, setCookie: res.headers.getSetCookie() };
  }

  async function addUser(email: string, role: string, password: string, siteIds: number[] = []): Promise<number> {
    const now = new Date().toISOString();
    const id = await db.run(`INSERT INTO users (email, name, password_hash, role, disabled, created_at, updated_at) VALUES (?, ?, ?, ?, FALSE, ?, ?)`, [
      email,
      `Test ${role}`,
      bcrypt.hashSync(password, 4),
      role,
      now,
      now,
    ]);
    for (const siteId of siteIds) await db.run(`INSERT INTO user_sites (user_id, site_id) VALUES (?, ?)`, [id, siteId]);
    return id;
  }

  async function browserSignIn(email: string, password: string): Promise<string> {
    const res = await api('POST', '/api/auth/login', null, { email, password, session: 'cookie' }, { [CSRF_HEADER]: '1' });
    expect(res.status).toBe(200);
    return sessionPair(res.setCookie);
  }

  function socketWith(opts: { cookie?: string; token?: string; headers?: Record<string, string>; transport?: 'websocket' | 'polling' }): Socket {
    const sock = ioClient(server.url, {
      transports: [opts.transport ?? 'websocket'],
      reconnection: false,
      ...(opts.token ? { auth: { token: opts.token } } : {}),
      extraHeaders: { ...(opts.cookie ? { cookie: opts.cookie } : {}), ...opts.headers },
    });
    sockets.push(sock);
    return sock;
  }
  const connected = (sock: Socket) =>
    new Promise<void>((resolve, reject) => {
      sock.once('connect', () => resolve());
      sock.once('connect_error', reject);
    });
  const refused = (sock: Socket) =>
    new Promise<Error>((resolve, reject) => {
      sock.once('connect', () => reject(new Error('connected')));
      sock.once('connect_error', resolve);
    });

  beforeAll(async () => {
    server = await startServerProcess();
    db = new Db(server.databaseUrl);
    [siteA] = await seedFleet(db, 1, 'ck-a');
    [siteB] = await seedFleet(db, 1, 'ck-b');
    await addUser('ck-admin@example.test', 'admin', ADMIN_PW);
    const res = await api('POST', '/api/auth/login', null, { email: 'ck-admin@example.test', password: ADMIN_PW });
    adminToken = res.body.token!;
  });

  afterAll(async () => {
    for (const s of sockets) s.close();
    await server?.stop('SIGTERM');
    await db?.close();
  });

  test('the handshake accepts the session cookie (websocket and polling) and still the bearer token', async () => {
    await addUser('ck-op@example.test', 'operator', 'sprocket-pulley-gauge-19');
    const cookie = await browserSignIn('ck-op@example.test', 'sprocket-pulley-gauge-19');
    for (const transport of ['websocket', 'polling'] as const) {
      const sock = socketWith({ cookie, transport, headers: { 'sec-fetch-site': 'same-origin' } });
      await connected(sock);
      expect((await sock.emitWithAck('watch', { fleet: true })).rooms).toEqual(['fleet']);
    }
    await connected(socketWith({ token: adminToken }));
    expect((await refused(socketWith({}))).message).toMatch(/unauthorized/);
    expect((await refused(socketWith({ cookie: 'jw_session=forged.token.value' }))).message).toMatch(/unauthorized/);
  });

  test('a cookie handshake from a page of another site is refused', async () => {
    await addUser('ck-op2@example.test', 'operator', 'pulley-sprocket-gauge-20');
    const cookie = await browserSignIn('ck-op2@example.test', 'pulley-sprocket-gauge-20');
    expect((await refused(socketWith({ cookie, headers: { 'sec-fetch-site': 'cross-site' } }))).message).toMatch(/unauthorized/);
    expect((await refused(socketWith({ cookie, headers: { origin: 'http://attacker.example' } }))).message).toMatch(/unauthorized/);
    await connected(socketWith({ cookie, headers: { origin: server.url } }));
  });

  test('disabling the user ends the cookie socket (told why first) and refuses the cookie from then on', async () => {
    const id = await addUser('ck-tech@example.test', 'technician', 'gasket-valve-sprocket-21');
    const cookie = await browserSignIn('ck-tech@example.test', 'gasket-valve-sprocket-21');
    const sock = socketWith({ cookie });
    await connected(sock);
    const told = new Promise<{ reason: string }>((resolve) => sock.once('session-ended', resolve));
    const gone = new Promise<string>((resolve) => sock.once('disconnect', resolve));
    expect((await api('PATCH', `/api/users/${id}`, adminToken, { disabled: true })).status).toBe(200);
    expect((await told).reason).toMatch(/administrator/);
    expect(await gone).toBe('io server disconnect');
    expect((await refused(socketWith({ cookie }))).message).toMatch(/unauthorized/);
    expect((await api('GET', '/api/auth/me', null, undefined, { cookie })).status).toBe(401);
  });

  test("work-order events follow the user's sites: a site-limited user gets only their sites' engines, an all-sites user gets both", async () => {
    await addUser('ck-limited@example.test', 'operator', 'orchard-lantern-kettle-22', [siteA.siteId]);
    const limitedCookie = await browserSignIn('ck-limited@example.test', 'orchard-lantern-kettle-22');
    const limited = socketWith({ cookie: limitedCookie });
    const all = socketWith({ token: adminToken });
    await Promise.all([connected(limited), connected(all)]);
    expect((await limited.emitWithAck('watch', { fleet: true })).rooms).toEqual([`site:${siteA.siteId}`]);
    expect((await all.emitWithAck('watch', { fleet: true, engineIds: [siteA.engineId] })).rooms).toEqual(['fleet', `engine:${siteA.engineId}`]);
    const toLimited: Array<{ engineId: number; id: number }> = [];
    const toAll: Array<{ engineId: number; id: number }> = [];
    limited.on('work-order', (m) => toLimited.push(m));
    all.on('work-order', (m) => toAll.push(m));

    // an order at the other site first: the all-sites user sees it
    const other = await api('POST', '/api/work-orders', adminToken, { engineId: siteB.engineId, kind: 'filter-change' });
    expect(other.status).toBe(201);
    await until(
      "the other site's order pushed to the all-sites user",
      async () => toAll,
      (xs) => xs.some((m) => m.id === other.body.id),
    );
    // then one at the limited user's site: it is the first event they get (events of one server arrive in order)
    const own = await api('POST', '/api/work-orders', adminToken, { engineId: siteA.engineId, kind: 'filter-change' });
    expect(own.status).toBe(201);
    await until(
      "the own site's order pushed to the limited user",
      async () => toLimited,
      (xs) => xs.length > 0,
    );
    await until(
      "the own site's order pushed to the all-sites user",
      async () => toAll,
      (xs) => xs.some((m) => m.id === own.body.id),
    );
    expect(toLimited[0]).toMatchObject({ id: own.body.id, engineId: siteA.engineId });
    expect(toLimited.map((m) => m.engineId)).not.toContain(siteB.engineId);
    // one event per change, even for a socket that is in several of the rooms
    expect(toAll.filter((m) => m.id === own.body.id)).toHaveLength(1);
  });
});
