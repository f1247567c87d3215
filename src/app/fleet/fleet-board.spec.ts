import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { Router, provideRouter } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { PreferencesService } from '../core/preferences.service';
import { CollapsedSites } from './collapsed-sites.service';
import { FleetBoard } from './fleet-board';
import { Engine, Site } from './fleet-types';

const SITES: Site[] = [
  { id: 1, name: 'Riverside Works', timeZone: 'America/Denver' },
  { id: 2, name: 'Hillcrest Pumping', timeZone: 'America/Denver' },
];

function engine(id: number, name: string, siteId: number, overrides: Partial<Engine> = {}, ageMs = 3000): Engine {
  const ts = Date.now() - ageMs;
  return {
    id,
    name,
    siteId,
    duty: 'standby',
    capacityL: 120,
    coolantFamily: 'conventional',
    glycolType: 'ethylene',
    glycolPercent: 50,
    capPressureKpa: 103,
    oilDrainIntervalH: 250,
    runHours: 1234,
    safeOpenTempC: 50,
    heaterSetpointC: 40,
    outOfService: false,
    retiredAt: null,
    createdAt: '2026-01-05T09:00:00.000Z',
    updatedAt: '2026-01-05T09:00:00.000Z',
    activeAlarms: 0,
    latest: {
      coolant_temp: { value: 45, ts, quality: 0 },
      coolant_pressure: { value: 20, ts, quality: 0 },
      coolant_conductivity: { value: 2100, ts, quality: 0 },
      engine_speed: { value: 0, ts, quality: 0 },
    },
    lastSeenAt: ts,
    runState: 'stopped',
    readiness: { ready: true, reasons: [] },
    ...overrides,
  };
}

const ENGINES: Engine[] = [
  engine(1, 'Genset North 1', 1),
  engine(2, 'Genset North 2', 1, { activeAlarms: 2 }),
  engine(3, 'Genset South 10', 1, { readiness: { ready: false, reasons: ['jacket water below the standby low limit'] } }),
  engine(4, 'Pompe à incendie 1', 2),
  engine(5, 'Compressor 3', 2, {}, 10 * 60_000),
];

describe('FleetBoard: search and collapse per site', () => {
  let harness: RouterTestingHarness;
  let http: HttpTestingController;
  let el: HTMLElement;

  const text = (node: Element | null) => node?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  const tileNames = () => Array.from(el.querySelectorAll('jw-engine-tile .name')).map((n) => n.textContent!.trim());
  const toggles = () => Array.from(el.querySelectorAll<HTMLButtonElement>('[data-testid=site-toggle]'));
  const toggle = (site: string) => toggles().find((b) => b.querySelector('.site-name')!.textContent!.trim() === site)!;
  const settle = async () => {
    await new Promise((r) => setTimeout(r, 0));
    await harness.fixture.whenStable();
    harness.detectChanges();
  };
  const type = async (value: string) => {
    const input = el.querySelector<HTMLInputElement>('[data-testid=fleet-search]')!;
    input.value = value;
    input.dispatchEvent(new Event('input'));
    await settle();
  };

  async function open(url = '/fleet'): Promise<void> {
    harness = await RouterTestingHarness.create();
    await harness.navigateByUrl(url, FleetBoard);
    http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/sites').flush(SITES);
    http.expectOne('/api/engines').flush(ENGINES);
    await settle();
    el = harness.routeNativeElement!;
  }

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({
      providers: [provideRouter([{ path: 'fleet', component: FleetBoard }]), provideHttpClient(), provideHttpClientTesting()],
    });
    TestBed.inject(PreferencesService).useSystem('metric');
  });

  it('groups by site and counts what is shown in words', async () => {
    await open();
    expect(toggles().map((b) => b.querySelector('.site-name')!.textContent!.trim())).toEqual(['Hillcrest Pumping', 'Riverside Works']);
    expect(tileNames()).toEqual(['Compressor 3', 'Pompe à incendie 1', 'Genset North 1', 'Genset North 2', 'Genset South 10']);
    expect(text(el.querySelector('[data-testid=shown-count]'))).toBe('5 of 5 engines shown');
  });

  it('narrows by engine or site name, ignoring case and accents, and keeps the search in the address', async () => {
    await open();
    await type('POMPE A');
    expect(tileNames()).toEqual(['Pompe à incendie 1']);
    expect(text(el.querySelector('[data-testid=shown-count]'))).toBe('1 of 5 engines shown');
    expect(TestBed.inject(Router).url).toBe('/fleet?q=POMPE%20A');

    await type('riverside north');
    expect(tileNames()).toEqual(['Genset North 1', 'Genset North 2']);

    el.querySelector<HTMLButtonElement>('[data-testid=clear-search]')!.click();
    await settle();
    expect(tileNames().length).toBe(5);
    expect(TestBed.inject(Router).url).toBe('/fleet');
  });

  it('keeps every key typed while the address catches up', async () => {
    await open();
    const input = el.querySelector<HTMLInputElement>('[data-testid=fleet-search]')!;
    for (const value of ['g', 'ge', 'gen', 'gens']) {
      input.value = value;
      input.dispatchEvent(new Event('input'));
      harness.detectChanges(); // each key starts a navigation before the one before it has ended
    }
    await settle();
    await settle();
    expect(input.value).toBe('gens');
    expect(TestBed.inject(Router).url).toBe('/fleet?q=gens');
  });

  it('starts from the search in the address', async () => {
    await open('/fleet?q=genset%20south');
    expect(el.querySelector<HTMLInputElement>('[data-testid=fleet-search]')!.value).toBe('genset south');
    expect(tileNames()).toEqual(['Genset South 10']);
  });

  it('keeps the filters in the address as well, and follows the address when it changes', async () => {
    await open('/fleet?site=2&state=stopped');
    expect(tileNames()).toEqual(['Pompe à incendie 1']);
    el.querySelector<HTMLButtonElement>('mat-button-toggle[value=all] button')!.click();
    await settle();
    expect(tileNames()).toEqual(['Compressor 3', 'Pompe à incendie 1']);
    expect(TestBed.inject(Router).url).toBe('/fleet?site=2');

    await harness.navigateByUrl('/fleet?q=north');
    await settle();
    expect(el.querySelector<HTMLInputElement>('[data-testid=fleet-search]')!.value).toBe('north');
    expect(tileNames()).toEqual(['Genset North 1', 'Genset North 2']);
  });

  it('says what to do when nothing matches, and shows all again on request', async () => {
    await open();
    await type('turbine');
    expect(tileNames()).toEqual([]);
    const empty = el.querySelector('[data-testid=fleet-empty]')!;
    expect(text(empty)).toBe('No engine or site name contains “turbine”. Check the spelling or search for part of a name, or show all engines.');
    empty.querySelector<HTMLButtonElement>('button')!.click();
    await settle();
    expect(tileNames().length).toBe(5);
  });

  it('collapses a site from its header button: tiles not drawn, abnormal engines counted in words with a shape', async () => {
    await open();
    const riverside = toggle('Riverside Works');
    expect(riverside.getAttribute('aria-expanded')).toBe('true');
    riverside.click();
    await settle();
    expect(toggle('Riverside Works').getAttribute('aria-expanded')).toBe('false');
    expect(tileNames()).toEqual(['Compressor 3', 'Pompe à incendie 1']);
    const state = toggle('Riverside Works').querySelector('[data-testid=site-abnormal]')!;
    expect(text(state)).toBe('2 of 3 engines abnormal: 1 in alarm, 1 not ready');
    expect(state.classList).toContain('abnormal');
    expect(state.querySelector('mat-icon')!.getAttribute('fonticon')).toBe('warning');

    toggle('Hillcrest Pumping').click();
    await settle();
    expect(tileNames()).toEqual([]);
    expect(text(toggle('Hillcrest Pumping').querySelector('[data-testid=site-abnormal]'))).toBe('1 of 2 engines abnormal: 1 stale');
  });

  it('collapses and expands every site at once; a site with nothing abnormal says so calmly', async () => {
    await open();
    const button = (name: string) => Array.from(el.querySelectorAll<HTMLButtonElement>('.collapse-all button')).find((b) => text(b) === name)!;
    expect(button('Expand all').disabled).toBe(true);
    button('Collapse all').click();
    await settle();
    expect(tileNames()).toEqual([]);
    expect(toggles().every((b) => b.getAttribute('aria-expanded') === 'false')).toBe(true);
    expect(button('Collapse all').disabled).toBe(true);

    await type('Genset North 1');
    const state = toggle('Riverside Works').querySelector('[data-testid=site-abnormal]')!;
    expect(text(state)).toBe('1 engine, normal');
    expect(state.classList).not.toContain('abnormal');
    expect(state.querySelector('mat-icon')).toBeNull();

    button('Expand all').click();
    await settle();
    expect(tileNames()).toEqual(['Genset North 1']);
  });

  it('draws no tile of a folded site, so a large fleet folded away stays light', async () => {
    const sites: Site[] = Array.from({ length: 20 }, (_, i) => ({ id: 100 + i, name: `Site ${i + 1}`, timeZone: 'UTC' }));
    const engines = Array.from({ length: 2000 }, (_, i) => engine(1000 + i, `Engine ${i + 1}`, 100 + (i % 20)));
    // folded before the board opens, as after a reload
    TestBed.inject(CollapsedSites).collapseAll(sites.map((s) => s.id));
    harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/fleet', FleetBoard);
    http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/sites').flush(sites);
    http.expectOne('/api/engines').flush(engines);
    await settle();
    el = harness.routeNativeElement!;
    expect(el.querySelectorAll('jw-engine-tile').length).toBe(0);
    expect(toggles().length).toBe(20);
    expect(text(toggle('Site 1').querySelector('[data-testid=site-abnormal]'))).toBe('All 100 engines normal');
    expect(text(el.querySelector('[data-testid=shown-count]'))).toBe('2000 of 2000 engines shown');
  });
});
