import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, DeferBlockBehavior, TestBed } from '@angular/core/testing';
import { PreferencesService } from '../core/preferences.service';
import { OpeningCheckPanel } from './opening-check-panel';
import { CONDITION_TEXT } from './work-labels';
import { OpeningCheck } from './work-types';

const AT = '2026-12-02T01:10:00.000Z';

/** An answer of GET /api/engines/:id/opening-check for an engine stopped 300 s, hot, under pressure, heater at 55 °C. */
function hotWithHeater(over: Partial<OpeningCheck['settings']> = {}): OpeningCheck {
  return {
    engineId: 7,
    at: AT,
    clear: false,
    stale: false,
    clearAt: null,
    conditions: [
      { name: 'engine-stopped', met: false, value: 300, limit: 600, unit: 's', detail: '0 rpm' },
      { name: 'coolant-temperature', met: false, value: 71.4, limit: 50, unit: '°C' },
      { name: 'coolant-pressure', met: false, value: 42, limit: 7, unit: 'kPa' },
      { name: 'telemetry-fresh', met: true, value: 2, limit: 60, unit: 's' },
      { name: 'lockout-confirmed', met: false, value: false, limit: true, unit: '' },
      { name: 'held', met: false, value: 0, limit: 120, unit: 's' },
    ],
    reasons: [
      'Engine stopped for 5.0 min; needs 10.0 min.',
      'Coolant 71.4 °C is above the safe opening temperature 50 °C.',
      'The jacket-water heater is set to 55 °C, at or above the safe opening temperature 50 °C: the coolant will not cool below it until the heater is switched off (and locked out).',
    ],
    settings: { safeOpenTempC: 50, maxPressureKpa: 7, minStoppedS: 600, holdS: 120, staleAfterS: 60, heaterSetpointC: 55, ambientC: 20, ...over },
  };
}

describe('OpeningCheckPanel', () => {
  let fixture: ComponentFixture<OpeningCheckPanel>;
  let http: HttpTestingController;
  let el: HTMLElement;
  const text = () => el.textContent?.replace(/\s+/g, ' ').trim() ?? '';

  async function answer(c: OpeningCheck): Promise<void> {
    fixture.componentRef.setInput('engineId', 7);
    fixture.detectChanges();
    http.expectOne((r) => r.url === '/api/engines/7/opening-check').flush(c);
    await fixture.whenStable();
    fixture.detectChanges();
  }

  beforeEach(async () => {
    localStorage.clear();
    TestBed.configureTestingModule({
      imports: [OpeningCheckPanel],
      providers: [provideHttpClient(), provideHttpClientTesting()],
      // the chart stays a placeholder here: it is drawn by apexcharts, seen in the browser tests
      deferBlockBehavior: DeferBlockBehavior.Manual,
    });
    await TestBed.compileComponents();
    TestBed.inject(PreferencesService).useSystem('metric');
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(OpeningCheckPanel);
    el = fixture.nativeElement as HTMLElement;
  });

  afterEach(() => fixture?.destroy());

  it('shows every condition in words, with Met / Not met, and the reasons openly', async () => {
    await answer(hotWithHeater());
    const rows = Array.from(el.querySelectorAll('.conditions li')).map((li) => li.textContent!.replace(/\s+/g, ' ').trim());
    expect(rows.length).toBe(6);
    for (const [i, name] of ['engine-stopped', 'coolant-temperature', 'coolant-pressure', 'telemetry-fresh', 'lockout-confirmed', 'held'].entries()) {
      expect(rows[i]).toContain(CONDITION_TEXT[name]);
    }
    const states = Array.from(el.querySelectorAll('.conditions li .state')).map((e) => e.textContent!.trim());
    expect(states).toEqual(['Not met', 'Not met', 'Not met', 'Met', 'Not met', 'Not met']);
    expect(el.querySelectorAll('.reasons li').length).toBe(3);
    expect(text()).toContain('Engine stopped for 5.0 min; needs 10.0 min.');
    expect(text()).toContain('Not clear: keep the cooling system closed');
    // one unit style: durations of minutes in minutes, in the conditions and in the reasons alike
    expect(rows[0]).toContain('5.0 min, needs 10.0 min');
    expect(rows[5]).toContain('0.0 min, needs 2.0 min');
    expect(text()).not.toMatch(/stopped for \d+ s/);
  });

  it('a stop of days reads in days, not thousands of minutes', async () => {
    const c = hotWithHeater();
    c.conditions[0] = { name: 'engine-stopped', met: true, value: 3 * 86400, limit: 600, unit: 's', detail: '0 rpm' };
    await answer(c);
    expect(el.querySelector('.conditions li')!.textContent).toContain('3.0 d, needs 10.0 min');
  });

  it('says plainly that the check can never clear while the heater is on', async () => {
    await answer(hotWithHeater());
    const msg = el.querySelector('.heater')!.textContent!.replace(/\s+/g, ' ');
    expect(msg).toContain('set to 55.0 °C');
    expect(msg).toContain('safe opening temperature 50.0 °C');
    expect(msg).toContain('this check can never clear while the heater is on');
    expect(el.querySelector('.heater mat-icon')!.getAttribute('fonticon')).toBe('block'); // shape as well as colour
  });

  it('in US units the heater message reads °F', async () => {
    TestBed.inject(PreferencesService).useSystem('us');
    await answer(hotWithHeater());
    expect(el.querySelector('.heater')!.textContent).toContain('131.0 °F'); // 55 °C = 1.8 × 55 + 32 °F (NIST SP 811)
  });

  it('no heater message when the heater is set below the limit, or there is none', async () => {
    await answer(hotWithHeater({ heaterSetpointC: 40 }));
    expect(el.querySelector('.heater')).toBeNull();
  });

  it('while stopped and not clear, the cool-down chart has its place; while running it says it waits for the stop', async () => {
    await answer(hotWithHeater());
    expect(text()).toContain('Cool-down chart');
    const running = hotWithHeater();
    running.conditions[0] = { name: 'engine-stopped', met: false, value: 0, limit: 600, unit: 's', detail: 'running at 1500 rpm' };
    fixture.destroy();
    fixture = TestBed.createComponent(OpeningCheckPanel);
    el = fixture.nativeElement as HTMLElement;
    await answer(running);
    expect(text()).toContain('The cool-down chart starts when the engine has stopped.');
  });
});
