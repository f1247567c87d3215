import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { PreferencesService } from '../core/preferences.service';
import { EngineTile } from './engine-tile';
import { Engine } from './fleet-types';
import { FleetService } from './fleet.service';

function engine(overrides: Partial<Engine> = {}, ageMs = 3000): Engine {
  const ts = Date.now() - ageMs;
  return {
    id: 17,
    name: 'Genset North 2',
    siteId: 3,
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
      coolant_temp: { value: 84.2, ts, quality: 0 },
      coolant_pressure: { value: 96.5, ts, quality: 0 },
      coolant_conductivity: { value: 2100, ts, quality: 0 },
      engine_speed: { value: 1800, ts, quality: 0 },
    },
    lastSeenAt: ts,
    runState: 'running',
    ...overrides,
  };
}

describe('EngineTile', () => {
  let fixture: ComponentFixture<EngineTile>;
  let el: HTMLElement;

  function render(e: Engine): void {
    fixture.componentRef.setInput('engine', e);
    fixture.detectChanges();
  }
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;
  const values = () => Array.from(el.querySelectorAll('.value')).map((v) => v.textContent!.trim());
  const words = () => Array.from(el.querySelectorAll('jw-band-indicator .word')).map((w) => w.textContent!.trim());

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [EngineTile], providers: [provideRouter([])] });
    TestBed.inject(PreferencesService).useSystem('metric');
    fixture = TestBed.createComponent(EngineTile);
    el = fixture.nativeElement as HTMLElement;
  });

  it('given an id (the fleet board), draws that engine from the fleet list and follows its changes', async () => {
    TestBed.resetTestingModule();
    TestBed.configureTestingModule({ imports: [EngineTile], providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()] });
    TestBed.inject(PreferencesService).useSystem('metric');
    const http = TestBed.inject(HttpTestingController);
    const fleet = TestBed.inject(FleetService);
    const listed = (temp: number) => {
      const loaded = fleet.load();
      http.expectOne('/api/sites').flush([{ id: 3, name: 'North yard', timeZone: 'UTC' }]);
      const e = engine();
      http.expectOne('/api/engines').flush([{ ...e, latest: { ...e.latest, coolant_temp: { ...e.latest.coolant_temp!, value: temp } } }]);
      return loaded;
    };
    await listed(84.2);
    fixture = TestBed.createComponent(EngineTile);
    el = fixture.nativeElement as HTMLElement;
    fixture.componentRef.setInput('engine', 17);
    fixture.detectChanges();
    expect(text('.name')).toBe('Genset North 2');
    expect(values()[0]).toBe('84.2 °C');
    await listed(91.5);
    fixture.detectChanges();
    expect(values()[0]).toBe('91.5 °C');
  });

  it('shows name, duty, run state and the three coolant values with units', () => {
    render(engine());
    expect(text('.name')).toBe('Genset North 2');
    expect(text('.duty')).toBe('Standby');
    expect(text('.state-text')).toBe('Running');
    expect(el.querySelector('.state mat-icon')!.getAttribute('fonticon')).toBe('sync');
    expect(values()).toEqual(['84.2 °C', '97 kPa', '2,100 µS/cm']);
    expect(words()).toEqual([]);
  });

  it('links to the engine page with a spoken summary', () => {
    render(engine());
    const link = el.querySelector('a')!;
    expect(link.getAttribute('href')).toBe('/engines/17');
    expect(link.querySelector('.spoken')!.textContent!.trim()).toBe(
      'Genset North 2, Standby; Running; Temperature 84.2 °C; Pressure 97 kPa; Conductivity 2,100 µS/cm; 0 active alarms',
    );
  });

  it('flags values outside the running bands by word', () => {
    const e = engine();
    render({
      ...e,
      latest: { ...e.latest, coolant_temp: { ...e.latest.coolant_temp!, value: 101 }, coolant_pressure: { ...e.latest.coolant_pressure!, value: 20 } },
    });
    expect(words()).toEqual(['HIGH', 'LOW']);
    expect(el.querySelector('a .spoken')!.textContent).toContain('Temperature 101.0 °C above normal; Pressure 20 kPa below normal');
  });

  it('judges a stopped engine by the standby-warm band, and follows live engine speed', () => {
    const e = engine({ runState: 'running' });
    render({ ...e, latest: { ...e.latest, engine_speed: { value: 0, ts: Date.now(), quality: 0 }, coolant_temp: { value: 41, ts: Date.now(), quality: 0 } } });
    expect(text('.state-text')).toBe('Stopped');
    expect(words()).toEqual([]); // 41 °C is within 30-50 °C; no pressure band while stopped
    const bars = el.querySelectorAll('jw-band-indicator');
    expect(bars[1].getAttribute('aria-label')).toContain('no normal band for this state');
  });

  it('shows "no data" with the age of the last reading, by text and icon', () => {
    render(engine({}, 10 * 60 * 1000));
    expect(text('.state-text')).toBe('No data');
    expect(el.querySelector('.state mat-icon')!.getAttribute('fonticon')).toBe('cloud_off');
    expect(text('.age')).toMatch(/^· last (\d{4}-\d{2}-\d{2} )?\d{2}:\d{2} \S+ · 10 min ago$/);
    expect(el.querySelector('mat-card')!.classList).toContain('no-data');
    expect(el.querySelector('mat-card')!.getAttribute('data-stale')).toBe('true');
    expect(words()).toEqual([]); // stale values are not judged against a band
  });

  it('counts a connected gateway without recent readings as no data', () => {
    const old = engine({}, 14 * 60 * 1000);
    render({ ...old, lastSeenAt: Date.now() - 1000 });
    expect(text('.state-text')).toBe('No data');
    expect(text('.age')).toMatch(/· 14 min ago$/);
  });

  it('marks values older than the expected interval as stale before the engine counts as "no data"', () => {
    render(engine({}, 45 * 1000));
    expect(text('.state-text')).toBe('Running');
    expect(el.querySelectorAll('.row[data-stale="true"]').length).toBe(3);
    expect(el.querySelector('mat-card')!.getAttribute('data-stale')).toBe('true');
    expect(text('.age')).toMatch(/^· last (\d{4}-\d{2}-\d{2} )?\d{2}:\d{2} \S+ · 45 s ago$/);
    expect(el.querySelector('a .spoken')!.textContent).toContain('not current: last');
    render(engine({}, 5000));
    expect(el.querySelector('[data-stale]')).toBeNull();
  });

  it('writes the time of a stale value in the site zone', () => {
    fixture.componentRef.setInput('timeZone', 'America/Denver');
    render(engine({}, 10 * 60 * 1000));
    expect(text('.age')).toMatch(/^· last (\d{4}-\d{2}-\d{2} )?\d{2}:\d{2} M[SD]T · 10 min ago$/);
  });

  it('shows the active alarm count when the engine carries one', () => {
    render(engine({ activeAlarms: 2 }));
    expect(text('.alarms')).toBe('2 alarms');
    expect(el.querySelector('.alarms')!.classList).toContain('active');
    render(engine({ activeAlarms: 1 }));
    expect(text('.alarms')).toBe('1 alarm');
  });

  it('shows a standby engine as Ready, or Not ready with its reasons in words', () => {
    render(engine({ readiness: { ready: true, reasons: [] } }));
    expect(text('[data-testid="readiness"]')).toBe('Ready');
    expect(el.querySelector('[data-testid="readiness"]')!.classList).not.toContain('not-ready');
    render(
      engine({
        readiness: {
          ready: false,
          reasons: ['Jacket water cold: 20.0 °C (68.0 °F), below the 32.0 °C (89.6 °F) needed to start and take load at once', 'Out of service'],
        },
      }),
    );
    expect(text('.readiness-text')).toBe('Not ready');
    expect(text('.reasons')).toContain('Jacket water cold: 20.0 °C (68.0 °F)');
    expect(el.querySelector('[data-testid="readiness"]')!.classList).toContain('not-ready');
    render(engine({ duty: 'continuous' }));
    expect(el.querySelector('[data-testid="readiness"]')).toBeNull();
  });

  it('says "bad reading" instead of a number of bad quality', () => {
    const e = engine();
    render({ ...e, latest: { ...e.latest, coolant_pressure: { value: 999, ts: Date.now(), quality: 1 } } });
    expect(values()[1]).toBe('bad reading');
  });

  it('converts to US units when chosen', () => {
    TestBed.inject(PreferencesService).useSystem('us');
    render(engine());
    expect(values()).toEqual(['183.6 °F', '14.0 psi', '2,100 µS/cm']);
  });

  it('marks out of service', () => {
    render(engine({ outOfService: true }));
    expect(text('.oos')).toBe('Out of service');
  });

  // PG 40 vol % freezes at -20.6 °C (Lange's Handbook of Chemistry 15th ed., table 5.13); -25 °C = -13 °F (NIST SP 811: °F = °C x 1.8 + 32)
  const short = {
    status: 'short' as const,
    freezePointC: -20.6,
    requiredC: -25,
    designLowC: -20,
    marginK: 5,
    testId: 3,
    testedAt: '2026-11-01T17:00:00Z',
    message: 'Freeze protection short',
    action: 'Raise the glycol',
  };
  it('flags freeze protection short of the design low in words and with a snowflake, in the user units', () => {
    fixture.componentRef.setInput('timeZone', 'America/Denver');
    render(engine({ freezeProtection: short }));
    expect(text('[data-testid="freeze-short"]')).toBe('Freeze protection short:freezes at -20.6 °C, needs -25.0 °C or colder (test 2026-11-01 10:00 MST)');
    expect(el.querySelector('[data-testid="freeze-short"] mat-icon')?.getAttribute('fonticon')).toBe('ac_unit');
    expect(el.querySelector('a .spoken')!.textContent).toContain('freeze protection short: freezes at -20.6 °C');
    TestBed.inject(PreferencesService).useSystem('us');
    fixture.detectChanges();
    expect(text('[data-testid="freeze-short"]')).toContain('needs -13.0 °F or colder');
  });
  it('no flag when the protection meets the design low or cannot be judged', () => {
    render(engine({ freezeProtection: { ...short, status: 'ok', freezePointC: -33.3 } }));
    expect(el.querySelector('[data-testid="freeze-short"]')).toBeNull();
    render(engine({ freezeProtection: { ...short, status: 'unknown', requiredC: null, designLowC: null } }));
    expect(el.querySelector('[data-testid="freeze-short"]')).toBeNull();
  });
});
