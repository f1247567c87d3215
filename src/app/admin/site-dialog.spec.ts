import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { DEFAULT_CHEMISTRY_LIMITS } from '../../../shared/coolant';
import { PreferencesService } from '../core/preferences.service';
import { Site } from './admin-types';
import { SiteDialog } from './site-dialog';

// Expected values worked by hand from NIST Special Publication 811 (2008), Appendix B: t/°C = (t/°F - 32) / 1.8;
// a difference of 1 K = 1.8 °F. Freeze margin 5 K: common practice (admin setting).
describe('SiteDialog: lowest expected temperature in the user unit', () => {
  let fixture: ComponentFixture<SiteDialog>;
  let el: HTMLElement;
  let http: HttpTestingController;
  let close: ReturnType<typeof vi.fn>;

  function open(site: Site | null, system: 'us' | 'metric'): void {
    localStorage.clear();
    close = vi.fn();
    TestBed.configureTestingModule({
      imports: [SiteDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MAT_DIALOG_DATA, useValue: site },
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    TestBed.inject(PreferencesService).useSystem(system);
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(SiteDialog);
    el = fixture.nativeElement as HTMLElement;
    fixture.detectChanges();
    http.expectOne('/api/coolant-limits').flush({
      limits: { ...DEFAULT_CHEMISTRY_LIMITS },
      defaults: { ...DEFAULT_CHEMISTRY_LIMITS },
      extender: null,
      extenderDefault: { everyHours: 6000, everyDays: 1095 },
      configured: false,
      updatedAt: null,
    });
    fixture.detectChanges();
  }
  const input = () => el.querySelector<HTMLInputElement>('input[formcontrolname="designLow"]')!;
  function type(value: string): void {
    input().value = value;
    input().dispatchEvent(new Event('input'));
  }
  function submit(): void {
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    fixture.detectChanges();
  }

  it('US units: -30 °C shows as -22 °F with the 5 K margin as 9 °F; typing -40 °F sends -40 °C', () => {
    open({ id: 4, name: 'Ridge', timeZone: 'America/Denver', designLowTempC: -30 }, 'us');
    expect(Number(input().value)).toBe(-22);
    expect(el.textContent).toContain('°F');
    expect(el.textContent).toContain('at least 9 °F below it');
    type('-40');
    submit();
    const req = http.expectOne((r) => r.method === 'PATCH' && r.url === '/api/sites/4');
    expect(req.request.body).toEqual({ name: 'Ridge', timeZone: 'America/Denver', designLowTempC: -40 });
  });

  it('an unchanged value shown rounded in °F is not sent again; blank clears it', () => {
    open({ id: 4, name: 'Ridge', timeZone: 'America/Denver', designLowTempC: -29.3 }, 'us');
    expect(Number(input().value)).toBe(-20.7); // -29.3 x 1.8 + 32 = -20.74
    submit();
    expect(http.expectOne((r) => r.method === 'PATCH').request.body).toEqual({ name: 'Ridge', timeZone: 'America/Denver' });
    TestBed.resetTestingModule();
    open({ id: 4, name: 'Ridge', timeZone: 'America/Denver', designLowTempC: -29.3 }, 'metric');
    expect(Number(input().value)).toBe(-29.3);
    expect(el.textContent).toContain('at least 5 K below it');
    type('');
    submit();
    expect(http.expectOne((r) => r.method === 'PATCH').request.body).toEqual({ name: 'Ridge', timeZone: 'America/Denver', designLowTempC: null });
  });

  it('out of the server range (-80 to 40 °C = -112 to 104 °F) is refused before sending; a server refusal marks the field', () => {
    open(null, 'us');
    (el.querySelector('input[formcontrolname="name"]') as HTMLInputElement).value = 'Coast';
    el.querySelector('input[formcontrolname="name"]')!.dispatchEvent(new Event('input'));
    type('-113');
    submit();
    http.expectNone((r) => r.method === 'POST');
    expect(el.textContent).toContain('At least -112 °F');
    type('14');
    submit();
    const req = http.expectOne((r) => r.method === 'POST' && r.url === '/api/sites');
    expect(req.request.body.designLowTempC).toBe(-10); // (14 - 32) / 1.8
    req.flush({ error: 'designLowTempC: at most 40 degC', field: 'designLowTempC' }, { status: 400, statusText: 'Bad Request' });
    fixture.detectChanges();
    expect(el.textContent).toContain('At most 40 degC');
  });
});
