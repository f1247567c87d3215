import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { FormGroup } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { PreferencesService } from '../core/preferences.service';
import { Engine } from './admin-types';
import { EngineForm, EngineFormData } from './engine-form';

// Expected SI values are worked by hand from the exact factors of NIST Special Publication 811 (2008), Appendix B:
//   1 gallon (U.S.) = 3.785 411 784 L;  1 psi = 6.894 757 kPa;  t/°C = (t/°F - 32) / 1.8.
const SITES = [{ id: 3, name: 'North yard', timeZone: 'America/Chicago' }];

function engine(): Engine {
  return {
    id: 9,
    name: 'Standby set 2',
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
    latest: {},
    lastSeenAt: null,
    runState: 'no-data',
  };
}

describe('EngineForm', () => {
  let fixture: ComponentFixture<EngineForm>;
  let el: HTMLElement;
  let http: HttpTestingController;
  let close: ReturnType<typeof vi.fn>;

  function open(data: EngineFormData, system: 'us' | 'metric'): void {
    localStorage.clear();
    close = vi.fn();
    TestBed.configureTestingModule({
      imports: [EngineForm],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MAT_DIALOG_DATA, useValue: data },
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    TestBed.inject(PreferencesService).useSystem(system);
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(EngineForm);
    el = fixture.nativeElement as HTMLElement;
    fixture.detectChanges();
  }

  const input = (name: string) => el.querySelector<HTMLInputElement>(`input[formcontrolname="${name}"]`)!;
  function type(name: string, value: string): void {
    const i = input(name);
    i.value = value;
    i.dispatchEvent(new Event('input'));
  }
  function submit(): void {
    el.querySelector('form')!.dispatchEvent(new Event('submit'));
    fixture.detectChanges();
  }
  const form = () => (fixture.componentInstance as unknown as { form: FormGroup }).form;
  const suffixes = () => Array.from(el.querySelectorAll('.mat-mdc-form-field-text-suffix')).map((s) => s.textContent!.trim());

  afterEach(() => http.verify());
  // The first test pays for compiling the dialog's Material modules on a slow shared machine.
  vi.setConfig({ testTimeout: 20000 });

  it('takes US units and sends SI: gallons to litres, psi to kPa, °F to °C', () => {
    open({ engine: null, sites: SITES }, 'us');
    expect(suffixes()).toEqual(['%', 'US gal', 'psi', 'h', 'h', '°F']);
    form().get('siteId')!.setValue(3);
    type('name', 'Fire pump 1');
    type('capacityL', '50');
    type('capPressureKpa', '15');
    type('safeOpenTempC', '122');
    form().get('hasHeater')!.setValue(true);
    fixture.detectChanges();
    type('heaterSetpointC', '104');
    submit();

    const req = http.expectOne('/api/engines');
    expect(req.request.method).toBe('POST');
    const body = req.request.body;
    expect(body.capacityL).toBe(189.271); // 50 × 3.785 411 784 = 189.270 589 L
    expect(body.capPressureKpa).toBe(103.421); // 15 × 6.894 757 = 103.421 36 kPa
    expect(body.safeOpenTempC).toBe(50); // (122 - 32) / 1.8
    expect(body.heaterSetpointC).toBe(40); // (104 - 32) / 1.8
    expect(body).toMatchObject({ siteId: 3, name: 'Fire pump 1', glycolPercent: 50, oilDrainIntervalH: 250, runHours: 0, outOfService: false });
    req.flush({ ...engine(), id: 10 });
    expect(close).toHaveBeenCalled();
  }, 20000);

  it('keeps metric values as they are', () => {
    open({ engine: null, sites: SITES }, 'metric');
    form().get('siteId')!.setValue(3);
    type('name', 'Compressor A');
    type('capacityL', '75.5');
    type('capPressureKpa', '90');
    submit();
    const body = http.expectOne('/api/engines').request.body;
    expect(body).toMatchObject({ capacityL: 75.5, capPressureKpa: 90, safeOpenTempC: 50, heaterSetpointC: null });
  });

  it('shows an engine in US units and sends only the edited field, in SI', () => {
    open({ engine: engine(), sites: SITES }, 'us');
    expect(input('capacityL').value).toBe('31.7'); // 120 L / 3.785 411 784 = 31.70 US gal
    expect(input('safeOpenTempC').value).toBe('122'); // 50 °C
    type('safeOpenTempC', '113');
    submit();
    const req = http.expectOne('/api/engines/9');
    expect(req.request.method).toBe('PATCH');
    expect(req.request.body).toEqual({ safeOpenTempC: 45 }); // (113 - 32) / 1.8; the rounded 31.7 gal is not written back
    req.flush(engine());
  });

  it('checks the server limits in the user unit before sending', () => {
    open({ engine: null, sites: SITES }, 'us');
    form().get('siteId')!.setValue(3);
    type('name', 'Too big');
    type('capacityL', '1400'); // the server takes at most 5000 L = 1320.86 US gal
    submit();
    http.expectNone('/api/engines');
    expect(el.querySelector('mat-error')!.textContent!.trim()).toBe('At most 1320.86 US gal.');
  });

  it('puts a server refusal onto the field it names', () => {
    open({ engine: null, sites: SITES }, 'metric');
    form().get('siteId')!.setValue(3);
    type('name', 'Duplicate');
    type('capacityL', '100');
    submit();
    http.expectOne('/api/engines').flush({ error: 'siteId: site does not exist or is retired', field: 'siteId' }, { status: 400, statusText: 'Bad Request' });
    fixture.detectChanges();
    expect(form().get('siteId')!.errors).toEqual({ server: 'Site does not exist or is retired.' });
    expect(close).not.toHaveBeenCalled();
  });
});
