import { Writable } from 'node:stream';
import pino from 'pino';
import request from 'supertest';
import { createApp } from '../../server/app';
import { describeError, wrapPino } from '../../server/logger';
import { auth, makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(async () => {
  await t.close();
});

/** A real pino logger writing JSON lines into an array. */
function capture(level = 'info') {
  const lines: Record<string, unknown>[] = [];
  /** The lines as written (JSON.parse keeps only the last of a repeated key). */
  const raw: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, done) {
      for (const l of String(chunk).split('\n').filter(Boolean)) {
        raw.push(l);
        lines.push(JSON.parse(l));
      }
      done();
    },
  });
  return { log: wrapPino(pino({ level }, stream)), lines, raw };
}

describe('request log (pino-http)', () => {
  it('writes one JSON line per request with its id, the user id, status and duration', async () => {
    const { log, lines, raw } = capture();
    const app = createApp({ ...t.ctx, log }, { staticDir: '/nonexistent' });
    const res = await request(app).get('/api/auth/me?token=secret').set(auth(t.tokens.planner)).expect(200);
    const id = res.headers['x-request-id'];
    expect(id).toMatch(/^[0-9a-f-]{36}$/);
    const line = lines.find((l) => (l.req as { id?: string } | undefined)?.id === id);
    expect(line).toBeDefined();
    expect(line).toMatchObject({ userId: t.userIds.planner, level: 30, req: { method: 'GET', path: '/api/auth/me' }, res: { statusCode: 200 } });
    expect(typeof line!.responseTime).toBe('number');
    const written = raw.find((l) => l.includes(id))!;
    expect(written.match(/"userId"/g)).toHaveLength(1); // once, with the user's id
    expect(JSON.stringify(line)).not.toContain('secret');
    expect(JSON.stringify(line)).not.toContain('authorization');
  });

  it('logs a refused request at warn, without a user', async () => {
    const { log, lines } = capture();
    const app = createApp({ ...t.ctx, log }, { staticDir: '/nonexistent' });
    await request(app).get('/api/auth/me').expect(401);
    expect(lines.find((l) => (l.res as { statusCode?: number } | undefined)?.statusCode === 401)).toMatchObject({ level: 40, userId: null });
  });

  it('is silent at LOG_LEVEL silent', async () => {
    const { log, lines } = capture('silent');
    const app = createApp({ ...t.ctx, log }, { staticDir: '/nonexistent' });
    await request(app).get('/api/auth/me').set(auth(t.tokens.planner)).expect(200);
    log.error('not written');
    expect(lines).toEqual([]);
  });
});

describe('the wrapper', () => {
  it('keeps the call style: message, then an error or extra detail', () => {
    const { log, lines } = capture('debug');
    const err = Object.assign(new Error('boom'), { sql: 'SELECT 1' });
    log.error('failed', err);
    log.info('counted', { n: 3 });
    log.debug('plain');
    expect(lines[0]).toMatchObject({ level: 50, msg: 'failed', err: { message: 'boom' } });
    expect(lines[1]).toMatchObject({ level: 30, msg: 'counted', detail: { n: 3 } });
    expect(lines[2]).toMatchObject({ level: 20, msg: 'plain' });
    expect(describeError(err)).toContain('sql: SELECT 1');
  });
});
