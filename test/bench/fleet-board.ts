/**
 * The fleet board in Chromium while the whole fleet publishes: long tasks (PerformanceObserver 'longtask', the
 * browser's own > 50 ms main-thread tasks) while the board updates. A figure, not a test: `fleetLongTaskMaxMs`.
 * Needs the production build in dist/ (`npx ng build`) and Chromium at /usr/bin/chromium (or CHROMIUM_PATH).
 */
import fs from 'node:fs';
import { chromium, type Browser } from 'playwright-core';

/** Headless Chromium of the system, as the e2e harness starts it (test/e2e/harness.ts; not imported: it needs the DOM types). */
function launchBrowser(): Promise<Browser> {
  const executablePath = process.env.CHROMIUM_PATH || '/usr/bin/chromium';
  if (!fs.existsSync(executablePath)) throw new Error(`no Chromium at ${executablePath}`);
  return chromium.launch({
    executablePath,
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'],
  });
}

export interface FleetBoardFigures {
  tiles: number;
  longTasks: number;
  longTaskMaxMs: number;
  longTaskTotalMs: number;
  measuredMs: number;
}

/**
 * Signs in, opens the fleet board, waits for its tiles, then `whileUpdating` starts the publishers; long tasks are
 * counted from `settleMs` after that for `measureMs`.
 */
export async function fleetBoardLongTasks(opts: {
  url: string;
  email: string;
  password: string;
  whileUpdating: () => Promise<void>;
  settleMs: number;
  measureMs: number;
}): Promise<FleetBoardFigures> {
  const browser = await launchBrowser();
  try {
    const page = await browser.newPage({ viewport: { width: 1366, height: 900 } });
    // observer from the first script on, so no long task of the page escapes it (a string: no bundler helpers)
    await page.addInitScript(`
      window.__longTasks = [];
      new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__longTasks.push({ at: e.startTime, ms: e.duration }); })
        .observe({ type: 'longtask', buffered: true });
    `);
    await page.goto(`${opts.url}/sign-in`);
    await page.getByLabel(/e-?mail/i).fill(opts.email);
    await page.getByLabel('Password', { exact: true }).fill(opts.password);
    await page.getByRole('button', { name: /sign in/i }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'), { timeout: 60_000 });
    if (!new URL(page.url()).pathname.startsWith('/fleet')) await page.goto(`${opts.url}/fleet`);
    await page.getByRole('heading', { name: 'Fleet board' }).waitFor({ timeout: 60_000 });
    await page.locator('jw-engine-tile').first().waitFor({ timeout: 60_000 });
    const tiles = await page.locator('jw-engine-tile').count();
    await opts.whileUpdating();
    await page.waitForTimeout(opts.settleMs);
    const from = await page.evaluate('performance.now()');
    // BENCH_PROFILE=file.cpuprofile: the page's CPU profile over the measured time (open it in Chromium's devtools)
    const profileFile = process.env.BENCH_PROFILE;
    const cdp = profileFile ? await page.context().newCDPSession(page) : null;
    if (cdp) {
      await cdp.send('Profiler.enable');
      await cdp.send('Profiler.start');
    }
    await page.waitForTimeout(opts.measureMs);
    if (cdp && profileFile) fs.writeFileSync(profileFile, JSON.stringify((await cdp.send('Profiler.stop')).profile));
    const tasks = (await page.evaluate(`window.__longTasks.filter((t) => t.at >= ${Number(from)})`)) as Array<{ at: number; ms: number }>;
    return {
      tiles,
      longTasks: tasks.length,
      longTaskMaxMs: tasks.reduce((a, t) => Math.max(a, t.ms), 0),
      longTaskTotalMs: tasks.reduce((a, t) => a + t.ms, 0),
      measuredMs: opts.measureMs,
    };
  } finally {
    await browser.close();
  }
}
