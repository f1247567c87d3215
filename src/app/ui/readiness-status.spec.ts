import { ComponentFixture, TestBed } from '@angular/core/testing';
import { ReadinessStatus } from './readiness-status';

describe('ReadinessStatus', () => {
  let fixture: ComponentFixture<ReadinessStatus>;
  let el: HTMLElement;

  beforeEach(() => {
    TestBed.configureTestingModule({ imports: [ReadinessStatus] });
    fixture = TestBed.createComponent(ReadinessStatus);
    el = fixture.nativeElement as HTMLElement;
  });

  const render = (ready: boolean, reasons: string[]) => {
    fixture.componentRef.setInput('readiness', { ready, reasons });
    fixture.detectChanges();
  };
  const block = () => el.querySelector('[data-testid=readiness]')!;

  it('says Ready with a check circle and lists no reasons', () => {
    render(true, []);
    expect(block().getAttribute('data-ready')).toBe('true');
    expect(el.querySelector('.readiness-text')!.textContent!.trim()).toBe('Ready');
    expect(block().querySelector('mat-icon')!.getAttribute('fontIcon')).toBe('check_circle');
    expect(el.querySelector('[data-testid=readiness-reasons]')).toBeNull();
  });

  it('says Not ready with another shape and every reason in words', () => {
    const reasons = ['Jacket water cold: 20.0 °C (68.0 °F), below the 32.0 °C (89.6 °F) needed to start and take load at once', 'Out of service'];
    render(false, reasons);
    expect(block().getAttribute('data-ready')).toBe('false');
    expect(block().classList).toContain('not-ready');
    expect(el.querySelector('.readiness-text')!.textContent!.trim()).toBe('Not ready');
    expect(block().querySelector('mat-icon')!.getAttribute('fontIcon')).toBe('report');
    expect(Array.from(el.querySelectorAll('[data-testid=readiness-reasons] li')).map((li) => li.textContent!.trim())).toEqual(reasons);
  });
});
