import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, TestRequest, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { AlarmListPage } from './alarm-list-page';
import { Alarm } from './alarm-types';

const RAISED = Date.parse('2026-12-02T01:00:00Z');

function alarm(id: number): Alarm {
  return {
    id,
    engineId: 7,
    engineName: 'Pump house 1',
    siteId: 2,
    siteName: 'Riverside water works',
    rule: 'coolant_temp_very_high',
    title: 'Coolant temperature very high',
    priority: 'high',
    state: 'normal',
    active: false,
    raisedAt: new Date(RAISED - id * 60_000).toISOString(),
    value: 104.3,
    worstValue: 105.1,
    unit: 'degC',
    message: 'above 103 °C',
    acknowledgedAt: null,
    acknowledgedBy: null,
    note: null,
    shelvedUntil: null,
    shelveReason: null,
    clearedAt: null,
    closedAt: new Date(RAISED).toISOString(),
    escalationLevel: 0,
    lastNotifiedAt: null,
  };
}

/** The alarm history is paged on the server; "Now" and "On the shelf" stay live from the open alarms. */
describe('AlarmListPage history', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<AlarmListPage>;
  let el: HTMLElement;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [AlarmListPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(AlarmListPage);
    fixture.detectChanges();
    el = fixture.nativeElement as HTMLElement;
    await fixture.whenStable();
    // what the page loads besides the history (the fleet's sites and engines for the filters)
    for (const r of http.match((req) => !req.url.startsWith('/api/alarms'))) r.flush([]);
  });
  afterEach(() => http.verify());

  const history = (): TestRequest => {
    const reqs = http.match((r) => r.url === '/api/alarms' && r.params.get('state') === 'all');
    expect(reqs.length).toBe(1);
    return reqs[0];
  };
  /** The page takes the answer a few microtasks after the flush (the resource's promise): wait for the rows it should show. */
  const range = () => el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim();
  const shown = async (rows: number, label: string) => {
    for (let i = 0; i < 20 && (el.querySelectorAll('jw-alarm-row').length !== rows || range() !== label); i++) {
      await Promise.resolve();
      await fixture.whenStable();
    }
  };
  const flush = (req: TestRequest, total: number) => {
    const offset = Number(req.request.params.get('offset'));
    const limit = Number(req.request.params.get('limit'));
    const n = Math.max(0, Math.min(limit, total - offset));
    req.flush({ items: Array.from({ length: n }, (_, i) => alarm(offset + i + 1)), total, limit, offset });
  };

  it('asks for the first page of the history, shows the total and pages on the server', async () => {
    const toggle = Array.from(el.querySelectorAll<HTMLButtonElement>('mat-button-toggle button')).find((b) => b.textContent?.includes('History'))!;
    toggle.click();
    TestBed.tick(); // the request goes out when the page's resource runs; whenStable would wait for its answer
    const first = history();
    expect(first.request.params.get('offset')).toBe('0');
    expect(first.request.params.get('limit')).toBe('50');
    flush(first, 120);
    await shown(50, '1 – 50 of 120');
    expect(el.querySelectorAll('jw-alarm-row').length).toBe(50);
    expect(el.querySelector('.count')?.textContent).toContain('120 alarms');
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('1 – 50 of 120');

    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    TestBed.tick();
    const next = history();
    expect(next.request.params.get('offset')).toBe('50');
    flush(next, 120);
    await shown(50, '51 – 100 of 120');
    expect(el.querySelectorAll('jw-alarm-row')[0].textContent).toContain('Pump house 1');
    expect(el.querySelector('.mat-mdc-paginator-range-label')?.textContent?.trim()).toBe('51 – 100 of 120');
  });

  const openHistory = async () => {
    Array.from(el.querySelectorAll<HTMLButtonElement>('mat-button-toggle button'))
      .find((b) => b.textContent?.includes('History'))!
      .click();
    TestBed.tick();
  };

  it('a newer page asked before the older answers wins: the older request is cancelled, its answer never shown', async () => {
    await openHistory();
    flush(history(), 120);
    await shown(50, '1 – 50 of 120');
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    TestBed.tick();
    const second = history();
    expect(second.request.params.get('offset')).toBe('50');
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    TestBed.tick();
    expect(second.cancelled).toBe(true);
    const third = history();
    expect(third.request.params.get('offset')).toBe('100');
    flush(third, 120);
    await shown(20, '101 – 120 of 120');
    expect(el.querySelectorAll('jw-alarm-row').length).toBe(20);
    expect(el.querySelector('.count')?.textContent).toContain('120 alarms');
  });

  it('a failed load says why in words with a Retry that asks again', async () => {
    await openHistory();
    history().flush({ error: 'database busy' }, { status: 500, statusText: 'Server Error' });
    for (let i = 0; i < 20 && !el.querySelector('[role="alert"]'); i++) await fixture.whenStable();
    expect(el.querySelector('[role="alert"]')?.textContent).toContain('The alarm history could not be loaded: database busy.');
    Array.from(el.querySelectorAll<HTMLButtonElement>('[role="alert"] button'))
      .find((b) => b.textContent?.includes('Retry'))!
      .click();
    TestBed.tick();
    flush(history(), 3);
    await shown(3, '1 – 3 of 3');
    expect(el.querySelector('[role="alert"]')).toBeNull();
    expect(el.querySelectorAll('jw-alarm-row').length).toBe(3);
  });
});
