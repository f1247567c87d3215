import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { estimateAfterTopUps } from '../../../shared/coolant';
import { TopUpsCard } from './top-ups-card';
import { TopUpsAnswer } from './coolant-types';

/**
 * Top-ups card. Estimate by mass balance (C1V1 + C2V2 = C3V3): 40 L at 2.0 units/US gal after 16.4 L of water
 * -> 1.18 units/US gal, below the 1.2 low limit (common practice). 1 US gal = 3.785411784 L (NIST SP 811).
 */
describe('TopUpsCard', () => {
  let http: HttpTestingController;

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [TopUpsCard], providers: [provideHttpClient(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
  });

  async function render(answer: TopUpsAnswer) {
    const fixture = TestBed.createComponent(TopUpsCard);
    fixture.componentRef.setInput('engineId', 7);
    fixture.componentRef.setInput('canRecord', true);
    fixture.detectChanges();
    http.expectOne('/api/engines/7/coolant-top-ups').flush(answer);
    await fixture.whenStable();
    fixture.detectChanges();
    return fixture;
  }

  it('an estimate below the low limit says to test now, with its reasons', async () => {
    const e = estimateAfterTopUps({ capacityL: 40, scaUnitsPerGal: 2, glycolPercent: 40, lowUnitsPerGal: 1.2, topUps: [{ volumeL: 16.4, liquid: 'water' }] });
    const fixture = await render({
      topUps: [{ id: 1, engineId: 7, addedAt: '2026-12-01T10:00:00.000Z', volumeL: 16.4, liquid: 'water', premixPercent: null, notes: null, addedBy: 3 }],
      estimate: { ...e, basedOnTestAt: '2026-11-30T10:00:00.000Z', topUpsSince: 1 },
    });
    const el = fixture.nativeElement as HTMLElement;
    const est = el.querySelector('[data-test="top-up-estimate"]')!;
    expect(est.classList).toContain('abnormal');
    expect(est.textContent).toContain('Additive probably low: test now');
    expect(est.textContent).toContain('1.18 units/US gal');
    expect(el.textContent).toContain('16.4 L water');
  });

  it('records a top-up in US gallons as litres: 1 US gal -> 3.785411784 L', async () => {
    localStorage.setItem('jw.preferences', JSON.stringify({ temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light' }));
    const fixture = await render({ topUps: [], estimate: null });
    fixture.componentInstance.form.controls.volume.setValue('1');
    fixture.componentInstance.form.controls.liquid.setValue('water');
    (fixture.componentInstance as unknown as { save(): void }).save();
    const req = http.expectOne((r) => r.method === 'POST' && r.url === '/api/engines/7/coolant-top-ups');
    expect(req.request.body.volumeL).toBeCloseTo(3.785411784, 9);
    expect(req.request.body.liquid).toBe('water');
    expect(req.request.body.premixPercent).toBeNull();
  });

  it('no volume: says what to type, sends nothing', async () => {
    const fixture = await render({ topUps: [], estimate: null });
    (fixture.componentInstance as unknown as { save(): void }).save();
    fixture.detectChanges();
    expect((fixture.nativeElement as HTMLElement).querySelector('[role="alert"]')?.textContent).toContain('volumeL');
    http.verify();
  });
});
