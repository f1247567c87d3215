/**
 * The demo's first screens and the two daily jobs at the two widths that matter (1366 px desktop, 820 px tablet):
 * the technician's typed step value is saved as a draft and is still there after a reload; the planner turns a
 * due row into a work order through the short dialog (kind suggested, assignee, due date). Also: the rota week,
 * the calculators in US units, and the pages fit the width (no sideways scrolling, no cut cards).
 */
import assert from 'node:assert/strict';
import { after, before, describe, it } from 'node:test';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { ACCOUNTS, fillChecked, launchBrowser, openDialog, pickOption, shot, signIn, startStack, waitUntil, type Stack } from './harness';

interface Step {
  id: number;
  key: string;
  input: string;
  doneAt: string | null;
  resultValue: number | null;
  resultText: string | null;
}
interface Order {
  id: number;
  status: string;
  kind: string;
  engineId: number;
  assigneeId: number | null;
  dueDate: string | null;
  steps: Step[];
}
interface Summary {
  id: number;
  status: string;
  title: string;
}
interface DueEntry {
  engineId: number;
  engineName: string;
  taskKey: string;
  title: string;
  state: string;
  workKind: string | null;
  openWorkOrderId: number | null;
}
interface Person {
  id: number;
  name: string;
  role: string;
}

const WIDTHS = [1366, 820] as const;

describe('service planning at 1366 and 820 px (technician and planner)', () => {
  let stack: Stack;
  let browser: Browser;
  const contexts: BrowserContext[] = [];

  before(async () => {
    stack = await startStack({ simulate: false });
    browser = await launchBrowser();
  });
  after(async () => {
    for (const c of contexts) await c.close();
    await browser?.close();
    await stack?.stop();
  });

  async function pageAs(email: string, width: number, prefs?: Record<string, string>): Promise<Page> {
    const ctx = await browser.newContext({ viewport: { width, height: width > 1000 ? 900 : 1180 } });
    contexts.push(ctx);
    if (prefs) await ctx.addInitScript((p) => localStorage.setItem('jw.preferences', p), JSON.stringify(prefs));
    const page = await ctx.newPage();
    await signIn(page, stack, email);
    return page;
  }

  /** Nothing sticks out sideways: the page does not scroll horizontally and every card ends inside the window. */
  async function assertFits(page: Page, what: string): Promise<void> {
    const r = await page.evaluate(() => {
      const cards = Array.from(document.querySelectorAll('mat-card, .site, table'));
      const cut = cards.filter((c) => c.getBoundingClientRect().right > window.innerWidth + 1 && !c.closest('.table-wrap')).length;
      return { scroll: document.documentElement.scrollWidth, width: window.innerWidth, cut };
    });
    assert.ok(r.scroll <= r.width, `${what}: page ${r.scroll} px wide in a ${r.width} px window`);
    assert.equal(r.cut, 0, `${what}: cards cut at the right edge`);
  }

  for (const width of WIDTHS) {
    it(`technician at ${width} px: My work shows the seeded work; a typed step value survives a reload`, async () => {
      const token = await stack.login(ACCOUNTS.technician);
      const page = await pageAs(ACCOUNTS.technician, width);
      await page.goto(`${stack.baseUrl}/work/mine`);
      await page.getByRole('heading', { name: 'My work' }).waitFor();
      const mine = (await stack.api<Summary[]>('GET', '/api/work-orders?mine=1', token)).body;
      const going = mine.find((o) => o.status === 'in-progress');
      assert.ok(going, 'the demo technician has work under way');
      const card = page.getByRole('link', { name: new RegExp(`^Work order ${going.id}:`) });
      await card.waitFor();
      await assertFits(page, `My work at ${width}`);
      await shot(page, `plan-${width}-1-my-work`);
      await card.click();
      await page.waitForURL(new RegExp(`/work/${going.id}$`));

      const order = (await stack.api<Order>('GET', `/api/work-orders/${going.id}`, token)).body;
      const step = order.steps.find((s) => s.input === 'value' && !s.doneAt)!;
      const item = page.locator('li.step').nth(order.steps.findIndex((s) => s.id === step.id));
      const value = width === 1366 ? '42.5' : '43';
      const note = `block warm at ${width}`;
      await fillChecked(item.getByLabel('Value'), value);
      await fillChecked(item.getByLabel('Remark'), note);
      await item.getByText('Draft saved').waitFor({ timeout: 15000 });
      await waitUntil(
        async () => {
          const st = (await stack.api<Order>('GET', `/api/work-orders/${going.id}`, token)).body.steps.find((s) => s.id === step.id)!;
          return st.resultValue === Number(value) && st.resultText === note && st.doneAt === null;
        },
        { timeoutMs: 10000, what: 'the draft on the server' },
      );
      await page.reload();
      const again = page.locator('li.step').nth(order.steps.findIndex((s) => s.id === step.id));
      await again.getByLabel('Remark').waitFor();
      await waitUntil(async () => (await again.getByLabel('Value').inputValue()) === value, { timeoutMs: 10000, what: 'the drafted value after the reload' });
      assert.equal(await again.getByLabel('Remark').inputValue(), note, 'the drafted remark after the reload');
      await assertFits(page, `work order at ${width}`);
      await again.scrollIntoViewIfNeeded();
      await shot(page, `plan-${width}-2-draft-after-reload`);
    });

    it(`planner at ${width} px: a due row opens the create dialog (kind suggested, assignee, due date)`, async () => {
      const token = await stack.login(ACCOUNTS.planner);
      const due = (await stack.api<{ sites: { entries: DueEntry[] }[] }>('GET', '/api/due-list?windowDays=14', token)).body;
      const free = due.sites.flatMap((s) => s.entries).filter((e) => e.workKind && !e.openWorkOrderId);
      const entry = free[width === 1366 ? 0 : free.length - 1];
      assert.ok(entry, 'a due task without a work order');
      const people = (await stack.api<Person[]>('GET', '/api/people?role=technician', token)).body;
      const assignee = people.find((p) => p.name !== 'Tobias Renwick') ?? people[0];

      const page = await pageAs(ACCOUNTS.planner, width);
      await page.goto(`${stack.baseUrl}/due`);
      await page.getByRole('heading', { name: 'Service due' }).waitFor();
      const row = page.locator('tr', { hasText: entry.engineName }).filter({ hasText: entry.title }).first();
      await row.waitFor();
      await assertFits(page, `due list at ${width}`);
      await shot(page, `plan-${width}-3-due-list`);
      await row.getByRole('button', { name: 'Create work order' }).click();
      const dialog = await openDialog(page);
      const templates = (await stack.api<{ kind: string; title: string }[]>('GET', '/api/work-order-templates', token)).body;
      const kindTitle = templates.find((t) => t.kind === entry.workKind)?.title ?? '';
      await waitUntil(async () => ((await dialog.getByRole('combobox', { name: 'Kind of work' }).textContent()) ?? '').includes(kindTitle), {
        timeoutMs: 10000,
        what: `the suggested kind ${kindTitle}`,
      });
      await pickOption(page, dialog.getByRole('combobox', { name: 'Assign to' }), assignee.name);
      await fillChecked(dialog.getByLabel('Due date'), '12/24/2030');
      await shot(page, `plan-${width}-4-create-dialog`);
      const box = await dialog.boundingBox();
      assert.ok(box && box.x >= 0 && box.x + box.width <= width, `the dialog fits the ${width} px window`);
      await dialog.getByRole('button', { name: 'Create' }).click();
      await dialog.waitFor({ state: 'detached' });
      const link = row.getByRole('link', { name: /Work order #\d+ created|Open work order #\d+/ }).first();
      await link.waitFor({ timeout: 15000 });
      const id = Number(((await link.textContent()) ?? '').match(/#(\d+)/)?.[1]);
      const order = (await stack.api<Order>('GET', `/api/work-orders/${id}`, token)).body;
      assert.equal(order.kind, entry.workKind, 'the kind the task suggests');
      assert.equal(order.assigneeId, assignee.id, 'assigned as chosen');
      assert.equal(order.dueDate, '2030-12-24', 'the due date, whole');
      assert.equal(order.engineId, entry.engineId);
      await shot(page, `plan-${width}-5-created`);
    });

    it(`calculators at ${width} px fit, and in US units every result and explanation is in US units`, async () => {
      const page = await pageAs(ACCOUNTS.planner, width, { temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light' } as Record<string, string>);
      await page.goto(`${stack.baseUrl}/calculators`);
      await page.getByRole('heading', { name: 'Coolant calculators' }).waitFor();
      const boil = page.locator('#boiling-point');
      await fillChecked(boil.getByLabel('Cap rating (gauge)'), '15');
      await boil.locator('.why').first().waitFor();
      const boilText = (await boil.innerText()) ?? '';
      assert.match(boilText, /cap 15 psi/, 'the cap as entered, in psi');
      assert.doesNotMatch(boilText, /kPa|°C/, `no metric left in the boiling card: ${boilText}`);
      const dose = page.locator('#additive-dose');
      await fillChecked(dose.getByLabel('SCA reading'), '0.8');
      await fillChecked(dose.getByLabel('Cooling-system capacity'), '45');
      await dose.locator('[data-test=reasons]').waitFor();
      const reasons = (await dose.locator('[data-test=reasons]').innerText()) ?? '';
      assert.match(reasons, /US gal/);
      assert.doesNotMatch(reasons, /\d L\b/, `no litres in the explanation: ${reasons}`);
      const mix = page.locator('#mix-correction');
      await fillChecked(mix.getByLabel('Capacity'), '45');
      await fillChecked(mix.getByLabel('Measured'), '40');
      const mixText = await mix.locator('ul.why').innerText();
      assert.doesNotMatch(mixText, /\d L\b/, `no litres in the mix explanation: ${mixText}`);
      await assertFits(page, `calculators at ${width}`);
      await page.evaluate(() => window.scrollTo(0, 0));
      await shot(page, `plan-${width}-6-calculators-us`);
    });

    it(`rota at ${width} px: the week of a site in its zone, 24-hour times; an overlap and uncovered hours are warned before saving`, async () => {
      const page = await pageAs(ACCOUNTS.planner, width);
      await page.goto(`${stack.baseUrl}/alarms/on-call`);
      await page.locator('jw-rota-week-view li.day').nth(6).waitFor();
      await page.locator('jw-rota-week-view .seg').first().waitFor();
      assert.doesNotMatch((await page.locator('jw-rota-week-view').innerText()) ?? '', /\b(AM|PM)\b/);
      await assertFits(page, `rota at ${width}`);
      await shot(page, `plan-${width}-7-rota-week`);

      // a shift on top of the seeded one, tomorrow 08:00-12:00 in the site's zone: the dialog names the overlap
      const tomorrow = (await page
        .locator('jw-rota-week-view li.day')
        .nth(width === 1366 ? 2 : 3)
        .getAttribute('data-date'))!;
      await page.getByRole('button', { name: /New shift/ }).click();
      const dialog = await openDialog(page);
      await pickOption(page, dialog.getByRole('combobox', { name: 'On call' }), /Dagny Ferreira-Holt/);
      await fillChecked(dialog.getByLabel('From'), `${tomorrow} 08:00`);
      await fillChecked(dialog.getByLabel('Until'), `${tomorrow} 12:00`);
      const warning = dialog.getByRole('status', { name: 'Warnings before saving' });
      await warning.getByText(new RegExp(`Overlaps Tobias Renwick's shift: ${tomorrow} 08:00 to ${tomorrow} 12:00`)).waitFor();
      await shot(page, `plan-${width}-8-rota-overlap-warned`);
      await dialog.getByRole('button', { name: 'Save anyway' }).click();
      await dialog.waitFor({ state: 'detached' });
      const day = page.locator(`jw-rota-week-view li.day[data-date="${tomorrow}"]`);
      await day.getByText(/Overlap 08:00–12:00: Tobias Renwick and Dagny Ferreira-Holt/).waitFor();
      await page.getByText(/This week: .*\d+ overlaps?\./).waitFor();
      await day.scrollIntoViewIfNeeded();
      await shot(page, `plan-${width}-9-rota-overlap-shown`);

      // half a year ahead the demo rota has ended: every hour is marked uncovered
      for (let i = 0; i < 30; i++) await page.getByRole('button', { name: 'Next week' }).click();
      await page.getByText('This week: 168 h with nobody on call, no overlaps.').waitFor();
      assert.equal(await page.locator('jw-rota-week-view .warn', { hasText: 'Uncovered 00:00–24:00' }).count(), 7);
      await page.evaluate(() => window.scrollTo(0, 0));
      await shot(page, `plan-${width}-10-rota-uncovered`);
    });

    it(`coolant page at ${width} px: reached from the engine page and the service history, one field per quantity`, async () => {
      const token = await stack.login(ACCOUNTS.technician);
      const engine = (await stack.api<{ id: number; name: string }[]>('GET', '/api/engines', token)).body.find((e) => e.name === 'Works gen-set A')!;
      const page = await pageAs(ACCOUNTS.technician, width, { temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light' });
      await page.goto(`${stack.baseUrl}/engines/${engine.id}/history`);
      await page.locator('[data-test=coolant-link]').click();
      await page.getByRole('heading', { name: `Coolant of ${engine.name}` }).waitFor();
      await page.goto(`${stack.baseUrl}/engines/${engine.id}`);
      await page.getByRole('link', { name: 'Coolant tests' }).click();
      await page.getByRole('heading', { name: `Coolant of ${engine.name}` }).waitFor();
      const form = page.locator('mat-card.record');
      await fillChecked(form.getByLabel('SCA', { exact: true }), '0.8');
      assert.equal(await form.getByLabel('SCA reading').count(), 0, 'the SCA is asked for once');
      assert.equal(await form.getByLabel('Cooling-system capacity').count(), 0, "the engine's capacity is not asked for again");
      const text = await page.locator('main, body').first().innerText();
      assert.doesNotMatch(text, /pH pH/, 'no doubled unit on pH');
      const reasons = await form.locator('jw-additive-decision [data-test=reasons]').innerText();
      assert.doesNotMatch(reasons, /\d L\b/, `no litres in the explanation: ${reasons}`);
      await assertFits(page, `coolant page at ${width}`);
      await page.evaluate(() => window.scrollTo(0, 0));
      await shot(page, `plan-${width}-12-coolant-page`);
    });

    it(`an account with no work at ${width} px: My work says what to do next`, async () => {
      const page = await pageAs(ACCOUNTS.admin, width);
      await page.goto(`${stack.baseUrl}/work/mine`);
      const empty = page.getByRole('status').filter({ hasText: 'Nothing assigned to you right now.' });
      await empty.waitFor();
      await empty.getByRole('link', { name: 'See what is due' }).waitFor();
      await shot(page, `plan-${width}-11-my-work-empty`);
      await empty.getByRole('link', { name: 'See what is due' }).click();
      await page.getByRole('heading', { name: 'Service due' }).waitFor();
    });
  }
});
