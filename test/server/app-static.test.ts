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

  it('index.html is never cached, hashed assets are immutable, a missing file with an extension is 404', async () => {
    const dir = path.join(t.dataDir, 'browser-cache');
    fs.mkdirSync(dir);
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>jw</title>');
    fs.writeFileSync(path.join(dir, 'chunk-34477KXJ.js'), 'export {}');
    fs.writeFileSync(path.join(dir, 'favicon.svg'), '<svg/>');
    const app = createApp(t.ctx, { staticDir: dir });
    expect((await request(app).get('/').expect(200)).headers['cache-control']).toBe('no-cache');
    expect((await request(app).get('/index.html').expect(200)).headers['cache-control']).toBe('no-cache');
    expect((await request(app).get('/fleet').expect(200)).headers['cache-control']).toBe('no-cache');
    expect((await request(app).get('/chunk-34477KXJ.js').expect(200)).headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect((await request(app).get('/favicon.svg').expect(200)).headers['cache-control']).toBe('public, max-age=3600');
    // the service worker, its file list and the app manifest name the current version
    for (const f of ['ngsw-worker.js', 'ngsw.json', 'safety-worker.js', 'manifest.webmanifest']) {
      fs.writeFileSync(path.join(dir, f), '{}');
      expect([f, (await request(app).get(`/${f}`).expect(200)).headers['cache-control']]).toEqual([f, 'no-cache']);
    }
    expect((await request(app).get('/manifest.webmanifest').expect(200)).headers['content-type']).toMatch(/^application\/manifest\+json/);
    const missing = await request(app).get('/chunk-ZZZZZZZZ.js').expect(404);
    expect(missing.text).not.toContain('<title>');
  });

  it('security headers on every response: CSP without inline script, no framing, nosniff, referrer policy', async () => {
    const dir = path.join(t.dataDir, 'browser-headers');
    fs.mkdirSync(dir);
    fs.writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>jw</title>');
    const app = createApp(t.ctx, { staticDir: dir });
    for (const res of [
      await request(app).get('/'),
      await request(app).get('/api/health'),
      await request(app).get('/api/engines'),
      await request(app).get('/nope.js'),
    ]) {
      const csp = res.headers['content-security-policy'];
      expect(csp).toMatch(/script-src 'self'(;|$)/);
      expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
      expect(csp).toMatch(/frame-ancestors 'none'/);
      expect(csp).toMatch(/object-src 'none'/);
      expect(res.headers['x-content-type-options']).toBe('nosniff');
      expect(res.headers['referrer-policy']).toBe('no-referrer');
      expect(res.headers['x-frame-options']).toBe('DENY');
      // plain HTTP: no HSTS
      expect(res.headers['strict-transport-security']).toBeUndefined();
    }
  });

  it('HSTS only when the request came over TLS (behind a trusted TLS proxy)', async () => {
    const behindProxy = createApp({ ...t.ctx, config: { ...t.ctx.config, trustProxy: 'loopback' } }, { staticDir: path.join(t.dataDir, 'none') });
    const tls = await request(behindProxy).get('/api/health').set('X-Forwarded-Proto', 'https').expect(200);
    expect(tls.headers['strict-transport-security']).toMatch(/max-age=\d+/);
    const plain = await request(t.app).get('/api/health').set('X-Forwarded-Proto', 'https').expect(200);
    expect(plain.headers['strict-transport-security']).toBeUndefined(); // not trusted without TRUST_PROXY
  });

  it('without a built app, non-API paths are plain 404s', async () => {
    await request(t.app).get('/fleet').expect(404);
  });
});
