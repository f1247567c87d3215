import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { PreferencesService } from '../core/preferences.service';
import { StepTopUp } from './step-top-up';
import { WorkStep } from './work-types';

// The volume is sent in the unit typed; the server converts (1 US gallon = 3.785411784 L, NIST SP 811, appendix B).
// Estimate shown after the step: the server's mass balance (C1V1 + C2V2 = C3V3).
const STEP: WorkStep = {
  id: 31,
  position: 4,
  key: 'add',
  title: 'Add coolant',
  detail: null,
  input: 'value',
  unit: 'L',
  optional: false,
  gated: false,
  caution: null,
  after: ['relieve-pressure'],
  resultValue: null,
  resultUnit: null,
  resultText: null,
  lockoutConfirmed: null,
  gateSnapshot: null,
  manualCheck: null,
  doneAt: null,
  doneByName: null,
};

describe('StepTopUp', () => {
  let fixture: ComponentFixture<StepTopUp>;
  let el: HTMLElement;
  let http: HttpTestingController;

  function open(system: 'us' | 'metric', step: WorkStep = STEP): void {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [StepTopUp], providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])] });
    TestBed.inject(PreferencesService).useSystem(system);
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(StepTopUp);
    fixture.componentRef.setInput('orderId', 7);
    fixture.componentRef.setInput('engineId', 3);
    fixture.componentRef.setInput('step', step);
    fixture.componentRef.setInput('canWork', true);
    el = fixture.nativeElement as HTMLElement;
    fixture.detectChanges();
  }
  const form = () => (fixture.componentInstance as unknown as { form: { controls: Record<string, { setValue(v: unknown): void }> } }).form;
  function submit(): void {
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    fixture.detectChanges();
  }

  it('US units: 2 US gal of 50 % premix is sent as typed with what it was', async () => {
    open('us');
    expect(el.textContent).toContain('US gal');
    form().controls['volume'].setValue(2);
    submit();
    const req = http.expectOne((r) => r.method === 'POST' && r.url === '/api/work-orders/7/steps/31/complete');
    expect(req.request.body).toEqual({ value: 2, unit: 'gal', topUp: { liquid: 'premix', premixPercent: 50 } });
    req.flush({ id: 7 });
  });

  it('plain water: says it dilutes, sends no premix share; no volume sends nothing; a refusal is shown', async () => {
    open('metric');
    form().controls['liquid'].setValue('water');
    fixture.detectChanges();
    expect(el.textContent).toContain('Plain water dilutes both the glycol');
    submit();
    http.expectNone((r) => r.method === 'POST');
    form().controls['volume'].setValue(5);
    submit();
    const req = http.expectOne((r) => r.method === 'POST');
    expect(req.request.body).toEqual({ value: 5, unit: 'L', topUp: { liquid: 'water', premixPercent: null } });
    req.flush({ error: 'value: at most the system capacity 40 L', field: 'value' }, { status: 400, statusText: 'Bad Request' });
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('[role=alert]')?.textContent).toContain('at most the system capacity 40 L');
  });

  it('a premix without its glycol share is not sent', () => {
    open('metric');
    form().controls['volume'].setValue(5);
    form().controls['premixPercent'].setValue(null);
    submit();
    http.expectNone((r) => r.method === 'POST');
  });

  it('done: shows the estimate after the top-up, and a test request when it is below the low limit', async () => {
    open('metric', { ...STEP, doneAt: '2026-12-02T17:00:00Z', resultValue: 8, resultUnit: 'L' });
    const estimate = {
      replacedFraction: 0.2,
      addedL: 8,
      scaUnitsPerGal: 1.12,
      glycolPercent: 40,
      nitritePpm: null,
      belowLow: true,
      reasons: ['Additive estimated at 1.12 units/US gal.'],
      basedOnTestAt: '2026-11-01T00:00:00Z',
      topUpsSince: 1,
    };
    http.expectOne('/api/engines/3/coolant-top-ups').flush({ topUps: [], estimate });
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('form')).toBeNull();
    expect(el.querySelector('[data-test=top-up-step-estimate]')?.textContent).toContain('Additive probably low: test the coolant now');
  });
});
