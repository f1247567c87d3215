import fs from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { createApp } from '../../server/app';
import { makeTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp({ signIn: false });
});
afterAll(() => t.close());

describe('static app with SPA fallback', () => {
  it('serves the built app, deep links get index.html, /api stays JSON', async () => {
    const dir = path.join(t.dataDir, 'browser');
    fs.mkdirSync(dir);
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>jw</title>');
    fs.writeFileSync(path.join(dir, 'main.js'), 'console.log(1)');
    const app = createApp(t.ctx, { staticDir: dir });
    expect((await request(app).get('/').expect(200)).text).toContain('<title>jw</title>');
    expect((await request(app).get('/engines/3/trend').expect(200)).text).toContain('<title>jw</title>');
    expect((await request(app).get('/main.js').expect(200)).text).toContain('console.log');
    const api = await request(app).get('/api/engines/3/trend').expect(401);
    expect(api.body.error).toBeDefined();
    expect((await request(app).get('/api/unknown').expect(404)).body.error).toMatch(/no such API route/);
  });

  it('without a built app, non-API paths are plain 404s', async () => {
    await request(t.app).get('/fleet').expect(404);
  });
});
