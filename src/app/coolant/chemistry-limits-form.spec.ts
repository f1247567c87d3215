import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { DEFAULT_CHEMISTRY_LIMITS } from '../../../shared/coolant';
import { PreferencesService } from '../core/preferences.service';
import { ChemistryLimitsForm } from './chemistry-limits-form';

/** Limits form: defaults (pH 7.5-11.0 ASTM D3306 / D6210 from memory; the rest common practice) shown, changes sent. */
describe('ChemistryLimitsForm', () => {
  it('shows the current limits and sends the changed ones with the extender interval', async () => {
    TestBed.configureTestingModule({ imports: [ChemistryLimitsForm], providers: [provideHttpClient(), provideHttpClientTesting()] });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ChemistryLimitsForm);
    fixture.detectChanges();
    const view = {
      limits: { ...DEFAULT_CHEMISTRY_LIMITS },
      defaults: { ...DEFAULT_CHEMISTRY_LIMITS },
      extender: null,
      extenderDefault: { everyHours: 6000, everyDays: 1095 },
      configured: false,
      updatedAt: null,
    };
    http.expectOne('/api/coolant-limits').flush(view);
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.textContent).toContain('6000 h or 1095 days');
    const form = (fixture.componentInstance as unknown as { form: { controls: Record<string, { value: unknown; setValue(v: unknown): void }> } }).form;
    expect(form.controls['nitriteLowPpm'].value).toBe(800);
    form.controls['nitriteLowPpm'].setValue(1000);
    form.controls['extenderHours'].setValue(4000);
    (el.querySelector('button[type="submit"]') as HTMLButtonElement).click();
    const req = http.expectOne((r) => r.method === 'PUT' && r.url === '/api/coolant-limits');
    expect(req.request.body).toMatchObject({ nitriteLowPpm: 1000, phLow: 7.5, extender: { everyHours: 4000, everyDays: null } });
    req.flush({ ...view, limits: { ...view.limits, nitriteLowPpm: 1000 }, extender: { everyHours: 4000, everyDays: null }, configured: true });
    await fixture.whenStable();
    fixture.detectChanges();
    expect(el.querySelector('[role="status"]')?.textContent).toContain('Saved');
  });

  it('US units: the freeze margin is typed in °F (5 K = 9 °F; 18 °F sent as 10 K, NIST SP 811: 1 K = 1.8 °F); unchanged it is sent as stored', async () => {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [ChemistryLimitsForm], providers: [provideHttpClient(), provideHttpClientTesting()] });
    TestBed.inject(PreferencesService).useSystem('us');
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(ChemistryLimitsForm);
    fixture.detectChanges();
    const view = {
      limits: { ...DEFAULT_CHEMISTRY_LIMITS, freezeMarginK: 3.3 },
      defaults: { ...DEFAULT_CHEMISTRY_LIMITS },
      extender: null,
      extenderDefault: { everyHours: 6000, everyDays: 1095 },
      configured: true,
      updatedAt: null,
    };
    http.expectOne('/api/coolant-limits').flush(view);
    await fixture.whenStable();
    fixture.detectChanges();
    const el = fixture.nativeElement as HTMLElement;
    const margin = el.querySelector<HTMLInputElement>('input[formcontrolname="freezeMargin"]')!;
    expect(Number(margin.value)).toBe(5.9); // 3.3 x 1.8 = 5.94
    expect(margin.closest('mat-form-field')!.textContent).toContain('°F');
    (el.querySelector('button[type="submit"]') as HTMLButtonElement).click();
    const unchanged = http.expectOne((r) => r.method === 'PUT');
    expect(unchanged.request.body.freezeMarginK).toBe(3.3);
    unchanged.flush(view);
    await fixture.whenStable();
    margin.value = '18';
    margin.dispatchEvent(new Event('input'));
    (el.querySelector('button[type="submit"]') as HTMLButtonElement).click();
    expect(http.expectOne((r) => r.method === 'PUT').request.body.freezeMarginK).toBe(10);
  });
});
