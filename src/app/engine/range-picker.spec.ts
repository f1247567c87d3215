import { ComponentFixture, TestBed } from '@angular/core/testing';
import { RangePicker } from './range-picker';
import { TREND_NOW, TrendRange, fromLocalInput, presetRange, toLocalInput } from './trend-range';

// A fixed clock: 2026-03-10 12:00:00 UTC.
const NOW = Date.UTC(2026, 2, 10, 12, 0, 0);
const HOUR = 3600 * 1000;

describe('RangePicker', () => {
  let fixture: ComponentFixture<RangePicker>;
  let el: HTMLElement;
  let emitted: TrendRange[];

  beforeEach(() => {
    TestBed.configureTestingModule({ imports: [RangePicker], providers: [{ provide: TREND_NOW, useValue: () => NOW }] });
    fixture = TestBed.createComponent(RangePicker);
    el = fixture.nativeElement as HTMLElement;
    emitted = [];
    fixture.componentInstance.valueChange.subscribe((r) => emitted.push(r));
    fixture.componentRef.setInput('value', presetRange('24h', NOW));
    fixture.detectChanges();
  });

  const toggle = (label: string) => {
    const b = Array.from(el.querySelectorAll<HTMLButtonElement>('mat-button-toggle button')).find((x) => x.textContent!.trim() === label);
    if (!b) throw new Error(`no toggle ${label}`);
    b.click();
    fixture.detectChanges();
  };

  it('emits a window ending now for each preset, of the preset length', () => {
    const cases: [string, number][] = [
      ['Last hour', HOUR],
      ['Last 24 h', 24 * HOUR],
      ['Last 7 days', 7 * 24 * HOUR],
      ['Last 30 days', 30 * 24 * HOUR],
    ];
    for (const [label] of cases) toggle(label);
    expect(emitted.map((r) => [r.from, r.to, r.live])).toEqual(cases.map(([, span]) => [NOW - span, NOW, true]));
    expect(emitted.map((r) => r.preset)).toEqual(['1h', '24h', '7d', '30d']);
    // 30 days back from 2026-03-10 12:00 UTC is 2026-02-08 12:00 UTC (February 2026 has 28 days)
    expect(new Date(emitted[3].from).toISOString()).toBe('2026-02-08T12:00:00.000Z');
  });

  it('highlights the preset of the window it is given', () => {
    fixture.componentRef.setInput('value', presetRange('7d', NOW));
    fixture.detectChanges();
    expect(el.querySelector('.mat-button-toggle-checked')!.textContent!.trim()).toBe('Last 7 days');
  });

  it('emits a typed from/to as a fixed window, and refuses a reversed one', () => {
    toggle('From–to');
    expect(emitted).toEqual([]); // choosing "From–to" only opens the fields
    const [from, to] = Array.from(el.querySelectorAll<HTMLInputElement>('input[type=datetime-local]'));
    const type = (input: HTMLInputElement, v: string) => {
      input.value = v;
      input.dispatchEvent(new Event('input'));
    };
    type(from, '2026-03-01T08:00');
    type(to, '2026-03-02T08:30');
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    fixture.detectChanges();
    expect(emitted).toHaveLength(1);
    expect(emitted[0]).toEqual({ preset: 'custom', from: fromLocalInput('2026-03-01T08:00'), to: fromLocalInput('2026-03-02T08:30'), live: false });
    expect(emitted[0].to - emitted[0].from).toBe(24.5 * HOUR);
    // the page shows the window it was given, and the fields stay open for the next edit
    fixture.componentRef.setInput('value', emitted[0]);
    fixture.detectChanges();
    expect(el.querySelector('.mat-button-toggle-checked')!.textContent!.trim()).toBe('From–to');

    const [from2, to2] = Array.from(el.querySelectorAll<HTMLInputElement>('input[type=datetime-local]'));
    type(from2, '2026-03-03T08:00');
    type(to2, '2026-03-02T08:00');
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    fixture.detectChanges();
    expect(emitted).toHaveLength(1);
    expect(el.querySelector('[role=alert]')!.textContent).toContain('start must be before the end');
  });

  it('a typed window that reaches past now ends at now and follows it', () => {
    toggle('From–to');
    const [from, to] = Array.from(el.querySelectorAll<HTMLInputElement>('input[type=datetime-local]'));
    from.value = toLocalInput(NOW - 2 * HOUR);
    from.dispatchEvent(new Event('input'));
    to.value = toLocalInput(NOW + 5 * HOUR);
    to.dispatchEvent(new Event('input'));
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    expect(emitted[0].to).toBe(NOW);
    expect(emitted[0].live).toBe(true);
  });

  it('reads typed times in the zone it is given and says which zone that is', () => {
    fixture.componentRef.setInput('zone', 'America/Denver');
    fixture.detectChanges();
    toggle('From–to');
    expect(el.querySelector('.zone')!.textContent).toContain('America/Denver (MDT)'); // 2026-03-10 is after the switch to summer time
    const [from, to] = Array.from(el.querySelectorAll<HTMLInputElement>('input[type=datetime-local]'));
    // the fields start from the window on screen, written in Denver time: 24 h back from 06:00 MDT
    expect(to.value).toBe('2026-03-10T06:00');
    from.value = '2026-03-01T08:00'; // MST, UTC-7
    from.dispatchEvent(new Event('input'));
    to.value = '2026-03-09T08:00'; // MDT, UTC-6
    to.dispatchEvent(new Event('input'));
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    expect(new Date(emitted[0].from).toISOString()).toBe('2026-03-01T15:00:00.000Z');
    expect(new Date(emitted[0].to).toISOString()).toBe('2026-03-09T14:00:00.000Z');
  });
});
