import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { PreferencesService } from '../core/preferences.service';
import { AlarmRow } from './alarm-row';
import { Alarm } from './alarm-types';

const RAISED = Date.parse('2026-12-02T01:00:00Z');

function alarm(over: Partial<Alarm> = {}): Alarm {
  return {
    id: 41,
    engineId: 7,
    engineName: 'Pump house 1',
    siteId: 2,
    siteName: 'Riverside water works',
    rule: 'coolant_temp_very_high',
    title: 'Coolant temperature very high',
    priority: 'high',
    state: 'unacknowledged',
    active: true,
    raisedAt: new Date(RAISED).toISOString(),
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
    closedAt: null,
    escalationLevel: 0,
    lastNotifiedAt: null,
    ...over,
  };
}

describe('AlarmRow', () => {
  let fixture: ComponentFixture<AlarmRow>;
  let el: HTMLElement;
  const text = (sel: string) => el.querySelector(sel)?.textContent?.replace(/\s+/g, ' ').trim() ?? null;

  function render(a: Alarm, inputs: Record<string, unknown> = {}): void {
    fixture.componentRef.setInput('alarm', a);
    fixture.componentRef.setInput('now', RAISED + 5 * 60_000);
    for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
    fixture.detectChanges();
  }

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [AlarmRow], providers: [provideRouter([])] });
    TestBed.inject(PreferencesService).useSystem('metric');
    fixture = TestBed.createComponent(AlarmRow);
    el = fixture.nativeElement as HTMLElement;
  });

  it('shows the priority as a word and a shape, one shape per priority', () => {
    const seen: [string | null, string | null][] = [];
    for (const p of ['urgent', 'high', 'medium', 'low'] as const) {
      render(alarm({ priority: p }));
      seen.push([text('.priority-text'), el.querySelector('.priority mat-icon')!.getAttribute('fonticon')]);
    }
    expect(seen).toEqual([
      ['Urgent', 'report'],
      ['High', 'warning'],
      ['Medium', 'diamond'],
      ['Low', 'info'],
    ]);
  });

  it('marks an unacknowledged alarm in words and with the heavy bar', () => {
    render(alarm());
    expect(el.querySelector('.row')!.classList).toContain('unack');
    expect(text('.unack-mark')).toBe('Unacknowledged');
  });

  it('marks a returned but unacknowledged alarm too, and says it returned', () => {
    render(alarm({ state: 'returned-unacknowledged', active: false }));
    expect(el.querySelector('.row')!.classList).toContain('unack');
    expect(text('.state')).toBe('Unacknowledged Returned to normal');
  });

  it('keeps an acknowledged alarm calm: state in words, no marker', () => {
    render(alarm({ state: 'acknowledged' }));
    expect(el.querySelector('.row')!.classList).not.toContain('unack');
    expect(el.querySelector('.unack-mark')).toBeNull();
    expect(text('.state-text')).toBe('Acknowledged');
  });

  it('shows engine, site, the value with its unit in the chosen units, and the age', () => {
    render(alarm());
    expect(text('.where')).toBe('Pump house 1 · Riverside water works');
    expect(text('.value .number')).toBe('104.3 °C');
    expect(text('.age')).toBe('5 min ago');
    // °F = °C × 9/5 + 32 (NIST SP 811, Appendix B): 104.3 °C = 219.74 °F
    TestBed.inject(PreferencesService).useSystem('us');
    fixture.detectChanges();
    expect(text('.value .number')).toBe('219.7 °F');
  });

  it('shows a rate with its unit per minute', () => {
    render(alarm({ unit: 'kPa/min', value: -3.5, rule: 'coolant_pressure_falling_stopped' }));
    expect(text('.value .number')).toBe('-3.5 kPa/min');
  });

  it('offers acknowledge only where allowed and only while waiting', () => {
    render(alarm(), { canAcknowledge: true });
    expect(el.querySelector('button.ack')).not.toBeNull();
    expect(el.querySelector('button.shelve')).toBeNull();
    render(alarm({ state: 'acknowledged' }), { canAcknowledge: true });
    expect(el.querySelector('button.ack')).toBeNull();
    render(alarm(), { canAcknowledge: false });
    expect(el.querySelector('button.ack')).toBeNull();
  });

  it('emits acknowledge and shelve with the alarm', () => {
    const acked: Alarm[] = [];
    const shelved: Alarm[] = [];
    fixture.componentInstance.acknowledge.subscribe((a) => acked.push(a));
    fixture.componentInstance.shelve.subscribe((a) => shelved.push(a));
    render(alarm(), { canAcknowledge: true, canShelve: true });
    (el.querySelector('button.ack') as HTMLButtonElement).click();
    (el.querySelector('button.shelve') as HTMLButtonElement).click();
    expect(acked.map((a) => a.id)).toEqual([41]);
    expect(shelved.map((a) => a.id)).toEqual([41]);
  });
});
