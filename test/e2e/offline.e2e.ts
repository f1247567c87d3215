/**
 * The technician's app without a network, end to end in Chromium with the production build's service
 * worker: the app is installable (manifest, icons, ngsw.json); a work order opened online comes back
 * from the cache after a reload while offline (`context.setOffline(true)`); steps, a value with a
 * remark, a manual opening check and a photo recorded offline are kept in IndexedDB and, back online,
 * sent in order and stored once each on the server (checked through the API). A gated step is locked
 * without a network except on a recorded manual check. A new version on the server shows the
 * "Update available" prompt instead of swapping the running app.
 *
 * The engine is added by this test and has no data at all, so the server's opening check finds its
 * live data missing (stale) and a manual check is allowed when it arrives (server/services/work-orders/step-service.ts).
 */
import assert from 'node:assert/strict';
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Locator, Page } from 'playwright-core';
import { ACCOUNTS, launchBrowser, pickOption, shot, signIn, startStack, type Stack } from './harness';

const DIST = path.resolve(__dirname, '../../dist/jacketwatch/browser');

interface Step {
  id: number;
  key: string;
  title: string;
  gated: boolean;
  doneAt: string | null;
  resultValue: number | null;
  resultText: string | null;
  manualCheck: unknown;
}
interface Order {
  id: number;
  engineId: number;
  status: string;
  title: string;
  steps: Step[];
  attachments: { id: number; stepId: number | null; originalName: string }[];
  parts: { kind: string; quantity: number; unit: string; description: string | null }[];
  history: { event: string; toStatus?: string | null; details: { stepId?: number } | null }[];
}

/** A small real PNG (solid grey, 8 x 8), deflated with zlib. */
function png(): Buffer {
  const table = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc = (b: Buffer) => {
    let c = 0xffffffff;
    for (const x of b) c = table[(c ^ x) & 0xff] ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const sum = Buffer.alloc(4);
    sum.writeUInt32BE(crc(body));
    return Buffer.concat([len, body, sum]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(8, 0);
  ihdr.writeUInt32BE(8, 4);
  ihdr.writeUInt8(8, 8);
  ihdr.writeUInt8(2, 9);
  const raw = Buffer.alloc((8 * 3 + 1) * 8, 120);
  for (let y = 0; y < 8; y++) raw[y * 25] = 0;
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlib.deflateSync(raw)),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

describe('the technician app without a network (service worker, IndexedDB outbox)', () => {
  let stack: Stack;
  let browser: Browser;
  let ctx: BrowserContext;
  let page: Page;
  let techToken: string;
  let order: Order;

  const tid = (id: string): Locator => page.locator(`[data-test="${id}"]`);
  const stepItem = (key: string): Locator =>
    // by position: a step's title also appears in a later step that waits for it
    page.locator('li.step').nth(order.steps.findIndex((s) => s.key === key));
  const serverOrder = async (): Promise<Order> => {
    const r = await stack.api<Order>('GET', `/api/work-orders/${order.id}`, techToken);
    assert.equal(r.status, 200);
    return r.body;
  };

  before(async () => {
    assert.ok(fs.existsSync(path.join(DIST, 'ngsw.json')), 'the production build has ngsw.json (run npx ng build)');
    stack = await startStack({ simulate: false });
    browser = await launchBrowser();
    const admin = await stack.login(ACCOUNTS.admin);
    const planner = await stack.login(ACCOUNTS.planner);
    techToken = await stack.login(ACCOUNTS.technician);
    const engines = await stack.api<{ id: number; siteId: number }[]>('GET', '/api/engines', techToken);
    const engine = await stack.api<{ id: number }>('POST', '/api/engines', admin, {
      siteId: engines.body[0].siteId,
      name: 'Fire-pump engine basement',
      capacityL: 40,
    });
    assert.equal(engine.status, 201, JSON.stringify(engine.body));
    const techs = await stack.api<{ id: number; email: string }[]>('GET', '/api/work-orders/assignees', planner);
    const techId = techs.body.find((u) => u.email === ACCOUNTS.technician)!.id;
    const created = await stack.api<Order>('POST', '/api/work-orders', planner, {
      engineId: engine.body.id,
      kind: 'filter-change',
      assigneeId: techId,
      title: 'Filter change in the basement',
    });
    assert.equal(created.status, 201, JSON.stringify(created.body));
    order = created.body;
    assert.equal((await stack.api('POST', `/api/work-orders/${order.id}/transition`, techToken, { to: 'in-progress' })).status, 200);
    // lockout/tagout confirmed online, before the network goes
    const lock = order.steps.find((s) => s.key === 'stop-and-lock-out')!;
    assert.equal((await stack.api('POST', `/api/work-orders/${order.id}/steps/${lock.id}/complete`, techToken, {})).status, 200);
    ctx = await browser.newContext({ viewport: { width: 1366, height: 900 } });
    page = await ctx.newPage();
  });

  after(async () => {
    // the browser's close ends its contexts too (closing the context first once hung after the update test,
    // with the service worker still busy)
    await browser?.close();
    await stack?.stop();
  });

  it('is installable: a web app manifest with the name and icons, and a service worker that controls the page', async () => {
    const manifest = await stack.api<{
      name: string;
      short_name: string;
      start_url: string;
      display: string;
      icons: { src: string; sizes: string; type: string; purpose: string }[];
    }>('GET', '/manifest.webmanifest');
    assert.equal(manifest.status, 200);
    assert.equal(manifest.body.name, 'Jacketwatch');
    assert.equal(manifest.body.display, 'standalone');
    for (const size of ['192x192', '512x512']) {
      const icon = manifest.body.icons.find((i) => i.sizes === size && i.type === 'image/png' && i.purpose === 'any');
      assert.ok(icon, `a ${size} PNG icon`);
      const res = await fetch(`${stack.baseUrl}/${icon.src}`);
      assert.equal(res.status, 200);
      assert.equal(res.headers.get('content-type'), 'image/png');
    }
    assert.ok(
      manifest.body.icons.some((i) => i.purpose === 'maskable'),
      'a maskable icon',
    );
    const index = await fetch(`${stack.baseUrl}/`);
    assert.equal(index.headers.get('cache-control'), 'no-cache', 'index.html is never HTTP-cached');
    assert.match(await index.text(), /<link rel="manifest" href="manifest.webmanifest"\s*\/?>/);
    for (const f of ['ngsw.json', 'ngsw-worker.js']) assert.equal((await fetch(`${stack.baseUrl}/${f}`)).headers.get('cache-control'), 'no-cache', f);

    await signIn(page, stack, ACCOUNTS.technician);
    await page.goto(`${stack.baseUrl}/work/${order.id}`);
    await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
    // the worker installs (prefetching the app) and takes the page; a reload then fetches the order through it
    await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, { timeout: 60000 });
    await page.reload();
    await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
    await stepItem('fit-filter').getByLabel('Remark').waitFor();
    // the fleet board and "My work" opened online once, so they are there offline too
    await page.goto(`${stack.baseUrl}/fleet`);
    await page.locator('jw-engine-tile', { hasText: 'Fire-pump engine basement' }).waitFor();
    await page.goto(`${stack.baseUrl}/work/mine`);
    await page.getByRole('link', { name: new RegExp(`^Work order ${order.id}:`) }).waitFor();
    await page.goto(`${stack.baseUrl}/work/${order.id}`);
    await stepItem('fit-filter').getByLabel('Remark').waitFor();
    const manifestLink = await page.evaluate(() => document.querySelector('link[rel="manifest"]')?.getAttribute('href'));
    assert.equal(manifestLink, 'manifest.webmanifest');
    // Chromium's own installability check (DevTools protocol): no errors means it offers to install the app
    const cdp = await ctx.newCDPSession(page);
    const manifestSeen = (await cdp.send('Page.getAppManifest')) as { url: string; errors: unknown[] };
    assert.match(manifestSeen.url, /manifest\.webmanifest$/);
    assert.deepEqual(manifestSeen.errors, []);
    const installability = (await cdp.send('Page.getInstallabilityErrors')) as { installabilityErrors: { errorId: string }[] };
    // a test browser context is always off the record ("in-incognito"); any other reason would be ours
    assert.deepEqual(
      installability.installabilityErrors.map((e) => e.errorId).filter((id) => id !== 'in-incognito'),
      [],
      'Chromium finds the app installable',
    );
    await cdp.detach();
  });

  it('offline: steps, a value with its remark, a manual check, a photo and a fluid used are kept on the device; a gated step waits for the manual check', async () => {
    await ctx.setOffline(true);
    await tid('offline-banner').waitFor();

    // a gated step: no live opening check without a network (an earlier reading is not shown as if current)
    await tid('gate-offline').waitFor();
    assert.equal(await page.locator('jw-opening-check-panel').count(), 0);
    const gated = stepItem('relieve-pressure');
    await gated.getByText('Locked: no network for the live opening check (a manual check is possible)').waitFor();
    assert.equal(await gated.getByRole('button', { name: 'Locked' }).isDisabled(), true);

    await stepItem('choose-filter').getByRole('button', { name: 'Mark done (sent later)' }).click();
    await tid('kept-choose-filter').waitFor();

    const fit = stepItem('fit-filter');
    await fit.getByLabel('Value').fill('0.75');
    await fit.getByLabel('Remark').fill('three quarters of a turn, offline');
    await tid('draft-fit-filter').getByText('Draft kept on this device').waitFor();
    await fit.getByRole('button', { name: 'Mark done (sent later)' }).click();
    await tid('kept-fit-filter').waitFor();

    // the recorded manual check unlocks the gated step; the server judges it when it arrives
    await gated.getByRole('checkbox', { name: /No network for the live check: go ahead on a manual check/ }).check();
    await gated.getByLabel('Gauge (kPa)').fill('0');
    await gated.getByLabel('Coolant (°C)').fill('31');
    await gated.getByLabel('Minutes since stop').fill('45');
    await gated.getByLabel('Why live data could not be used').fill('no network in the basement');
    await gated.getByRole('button', { name: 'Mark done (sent later)' }).click();
    await tid('kept-relieve-pressure').waitFor();

    const photo = stepItem('photo');
    await photo.locator('input[type=file]').setInputFiles({ name: 'fitted-filter.png', mimeType: 'image/png', buffer: png() });
    await tid('outbox').getByText('fitted-filter.png').waitFor();
    await photo.getByRole('button', { name: 'Mark done (sent later)' }).click();
    await tid('kept-photo').waitFor();

    // a fluid used, recorded under Parts & fluids
    await pickOption(page, page.getByRole('combobox', { name: 'What' }), 'Coolant');
    await page.getByLabel('Quantity').fill('2');
    await page.getByLabel('Description').fill('premix topped up after the filter');
    await page.getByRole('button', { name: 'Record', exact: true }).click();
    await tid('outbox').getByText('2 L Coolant: premix topped up after the filter').waitFor();
    await tid('outbox').screenshot({ path: path.join('test-output', 'screenshots', 'offline-01b-outbox.png') });

    await tid('outbox-summary').getByText('7 waiting to be sent · 0 sent · 0 not accepted').waitFor();
    await tid('outbox-indicator').getByText('7').waitFor();
    await shot(page, 'offline-01-recorded');
    // nothing reached the server
    const o = await serverOrder();
    assert.equal(o.steps.find((s) => s.key === 'choose-filter')!.doneAt, null);
    assert.equal(o.attachments.length, 0);
    assert.equal(o.parts.length, 0);
  });

  it('a reload while offline comes back from the cache, with everything still waiting', async () => {
    await page.reload();
    await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
    await tid('offline-banner').waitFor();
    await tid('outbox-summary').getByText('7 waiting to be sent').waitFor();
    for (const key of ['choose-filter', 'fit-filter', 'relieve-pressure', 'photo']) await tid(`kept-${key}`).waitFor();
    await shot(page, 'offline-02-after-reload');
    // the technician's other screens come from the cache too: My work (as last seen online) and the calculators (computed in the browser)
    await page.getByRole('link', { name: 'My work' }).click();
    await page.getByRole('link', { name: new RegExp(`^Work order ${order.id}:`) }).waitFor();
    await page.getByRole('link', { name: 'Coolant calculators' }).click();
    await page.getByRole('heading', { name: 'Coolant calculators' }).waitFor();
    await shot(page, 'offline-02a-calculators-offline');
    // the fleet board: the list as last seen, under the "Live data lost" banner, not a load error
    await page.getByRole('link', { name: 'Fleet board' }).click();
    await page.locator('jw-engine-tile', { hasText: 'Fire-pump engine basement' }).waitFor();
    await page.getByText(/Live data lost since/).waitFor();
    assert.equal(await page.getByText('The engine list could not be loaded').count(), 0, 'the cached list, not a load error');
    await shot(page, 'offline-02c-fleet-offline');
    await page.getByRole('link', { name: 'My work' }).click();
    await page.getByRole('link', { name: new RegExp(`^Work order ${order.id}:`) }).click();
    await tid('outbox-summary').getByText('7 waiting to be sent').waitFor();
    await page.setViewportSize({ width: 820, height: 1100 });
    await shot(page, 'offline-02b-after-reload-820');
    await page.setViewportSize({ width: 1366, height: 900 });
  });

  it('back online: everything is sent in order and stored once on the server', async () => {
    await ctx.setOffline(false);
    await tid('outbox-summary').getByText('0 waiting to be sent · 7 sent · 0 not accepted').waitFor({ timeout: 30000 });
    // the page shows the steps as the server has them
    await stepItem('photo').getByText('Done', { exact: true }).waitFor();
    await shot(page, 'offline-03-sent');

    const o = await serverOrder();
    const step = (k: string) => o.steps.find((s) => s.key === k)!;
    for (const k of ['choose-filter', 'fit-filter', 'relieve-pressure', 'photo']) assert.ok(step(k).doneAt, `${k} done`);
    assert.equal(step('fit-filter').resultValue, 0.75);
    assert.equal(step('fit-filter').resultText, 'three quarters of a turn, offline');
    assert.ok(step('relieve-pressure').manualCheck, 'the manual check is recorded');
    assert.deepEqual(
      o.attachments.map((a) => [a.stepId, a.originalName]),
      [[step('photo').id, 'fitted-filter.png']],
    );
    assert.deepEqual(
      o.parts.map((p) => [p.kind, p.quantity, p.unit, p.description]),
      [['coolant', 2, 'L', 'premix topped up after the filter']],
    );
    const done = o.history.filter((h) => h.event === 'step-done' || h.event === 'step-done-manual-check').map((h) => h.details?.stepId);
    // each step once: lock-out (online), then the four sent from the device, in the order recorded
    assert.deepEqual(
      done,
      ['stop-and-lock-out', 'choose-filter', 'fit-filter', 'relieve-pressure', 'photo'].map((k) => step(k).id),
    );

    // a reload online sends nothing again
    await page.reload();
    await tid('outbox-summary').getByText('0 waiting to be sent · 7 sent · 0 not accepted').waitFor();
    const again = await serverOrder();
    assert.equal(again.attachments.length, 1);
    assert.equal(again.parts.length, 1);
    assert.equal(again.history.length, o.history.length);
  });

  it('a refused change (the order was reassigned meanwhile) is shown plainly and kept', async () => {
    await ctx.setOffline(true);
    await tid('offline-banner').waitFor();
    const wipe = stepItem('wipe-base');
    await wipe.getByLabel('Remark').fill('base was pitted, cleaned twice');
    await tid('draft-wipe-base').getByText('Draft kept on this device').waitFor();
    // meanwhile the planner gives the order to nobody
    const planner = await stack.login(ACCOUNTS.planner);
    assert.equal((await stack.api('PATCH', `/api/work-orders/${order.id}`, planner, { assigneeId: null })).status, 200);
    await ctx.setOffline(false);
    const refused = tid('outbox-conflict');
    await refused.getByText('NOT ACCEPTED').waitFor({ timeout: 30000 });
    await refused.getByText('“base was pitted, cleaned twice”').waitFor();
    await refused
      .getByRole('alert')
      .getByText(/The server refused it: .*assigned/)
      .waitFor();
    await tid('outbox-indicator').getByText('not accepted').waitFor();
    // the page shows the order as the server has it now
    await page.getByText('Assignee: not assigned').waitFor();
    await shot(page, 'offline-04-conflict');
  });

  it('offline: a planned order is started and a step done on the device; back online the start is sent first, then the step', async () => {
    const planner = await stack.login(ACCOUNTS.planner);
    const techs = await stack.api<{ id: number; email: string }[]>('GET', '/api/work-orders/assignees', planner);
    const techId = techs.body.find((u) => u.email === ACCOUNTS.technician)!.id;
    const created = await stack.api<Order>('POST', '/api/work-orders', planner, {
      engineId: order.engineId,
      kind: 'weekly-inspection',
      assigneeId: techId,
      title: 'Weekly look in the basement',
    });
    assert.equal(created.status, 201, JSON.stringify(created.body));
    const id = created.body.id;
    // opened once online (so the worker has it), then the network goes
    await page.goto(`${stack.baseUrl}/work/${id}`);
    await page.getByRole('heading', { name: `#${id} Weekly look in the basement` }).waitFor();
    await page.getByRole('button', { name: 'Start work' }).waitFor();
    await ctx.setOffline(true);
    await tid('offline-banner').waitFor();
    await page.getByRole('button', { name: 'Start work' }).click();
    await tid('kept-status').getByText('Started on this device: waiting to be sent.').waitFor();
    await page.locator('li.step').nth(0).getByRole('button', { name: 'Mark done (sent later)' }).click();
    await tid('kept-coolant-level').waitFor();
    await shot(page, 'offline-04b-started-offline');
    assert.equal((await stack.api<Order>('GET', `/api/work-orders/${id}`, techToken)).body.status, 'planned', 'nothing reached the server');

    await ctx.setOffline(false);
    await tid('kept-status').waitFor({ state: 'detached', timeout: 30000 });
    await page.locator('li.step').nth(0).getByText('Done', { exact: true }).waitFor({ timeout: 30000 });
    const o = (await stack.api<Order>('GET', `/api/work-orders/${id}`, techToken)).body;
    assert.equal(o.status, 'in-progress');
    const started = o.history.findIndex((h) => h.toStatus === 'in-progress');
    const stepDone = o.history.findIndex((h) => h.event === 'step-done');
    assert.ok(started >= 0 && stepDone > started, `started, then the step (${JSON.stringify(o.history.map((h) => h.event))})`);
    // back to the first order for the tests after this one
    await page.goto(`${stack.baseUrl}/work/${order.id}`);
    await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
  });

  it('a new version on the server is offered with "Update available", not swapped in silently', async () => {
    const file = path.join(DIST, 'ngsw.json');
    const original = fs.readFileSync(file, 'utf8');
    try {
      // a new deployment: same files, a new manifest (its hash names the version)
      const next = JSON.parse(original) as { appData?: Record<string, unknown> };
      next.appData = { ...(next.appData ?? {}), build: `e2e-${Date.now()}` };
      fs.writeFileSync(file, JSON.stringify(next));
      await page.evaluate(() => navigator.serviceWorker.controller?.postMessage({ action: 'CHECK_FOR_UPDATES', nonce: 1 }));
      const prompt = tid('update-prompt');
      await prompt.getByText('Update available.').waitFor({ timeout: 60000 });
      await shot(page, 'offline-05-update-available');
      // the heading is on the old page too: wait for the reload itself, then for the page it brings
      const reloaded = page.waitForEvent('load');
      await prompt.getByRole('button', { name: 'Reload' }).click();
      await reloaded;
      await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
      assert.equal(await tid('update-prompt').count(), 0, 'the reloaded page runs the new version: nothing more to offer');
    } finally {
      fs.writeFileSync(file, original);
    }
  });
  it('signing out empties the cached API data: offline after sign-out, a reload shows the sign-in page, not the work', async () => {
    // entries the service worker keeps of the API (its data groups)
    const cachedApiEntries = () =>
      page.evaluate(async () => {
        let n = 0;
        for (const name of await caches.keys()) if (/:data:[^:]+:cache$/.test(name)) n += (await (await caches.open(name)).keys()).length;
        return n;
      });
    await page.getByRole('heading', { name: `#${order.id} Filter change in the basement` }).waitFor();
    assert.ok((await cachedApiEntries()) > 0, 'the worker keeps the technician’s data while signed in');
    await page.getByRole('button', { name: /, user menu$/ }).click();
    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL((url) => url.pathname.startsWith('/sign-in'));
    await page.waitForFunction(async () => {
      let n = 0;
      for (const name of await caches.keys()) if (/:data:[^:]+:cache$/.test(name)) n += (await (await caches.open(name)).keys()).length;
      return n === 0;
    });
    await ctx.setOffline(true);
    try {
      await page.goto(`${stack.baseUrl}/work/${order.id}`);
      await page.waitForURL((url) => url.pathname.startsWith('/sign-in'));
      await page.getByRole('button', { name: 'Sign in' }).waitFor();
      assert.equal(await page.getByText('Filter change in the basement').count(), 0, 'no trace of the work after sign-out');
      await shot(page, 'offline-06-signed-out-offline');
    } finally {
      await ctx.setOffline(false);
    }
  });
});
