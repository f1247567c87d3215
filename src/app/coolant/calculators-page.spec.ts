import { TestBed } from '@angular/core/testing';
import { PreferencesService } from '../core/preferences.service';
import { CalculatorsPage } from './calculators-page';

/**
 * Calculators page: mix correction by mass balance (C1V1 + C2V2 = C3V3, hand arithmetic) and the explanation panel.
 * Freeze point: CoolProp 8.0.0 INCOMP::APG (ASHRAE fit) 60 vol % propylene glycol -51.1 °C.
 */
describe('CalculatorsPage', () => {
  beforeEach(() => localStorage.clear());

  async function render(set: (p: CalculatorsPage) => void) {
    const fixture = TestBed.createComponent(CalculatorsPage);
    set(fixture.componentInstance);
    fixture.detectChanges();
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('a premix equal to the target: drain completely and refill with premix; the additive loss and its dose', async () => {
    const el = await render((p) => {
      p.form.controls.mixCapacity.setValue('100');
      p.form.controls.measured.setValue('40');
      p.form.controls.target.setValue('50');
      p.form.controls.premix.setValue('50');
      p.form.controls.mixSca.setValue('2');
      p.form.controls.mixStrength.setValue('10');
    });
    const card = el.querySelector('#mix-correction')!.textContent ?? '';
    expect(card).toContain('drain completely and refill with premix');
    expect(card).toContain('removes 100 % of its additive');
    // 2 units/US gal x 100 L / 3.785411784 = 52.8 units; / 10 units/L = 5.28 L -> 5.30 L
    expect(card).toContain('Add 5.30 L of liquid additive');
  });

  it('a target above 60 % is refused naming targetPercent', async () => {
    const el = await render((p) => {
      p.form.controls.mixCapacity.setValue('400');
      p.form.controls.measured.setValue('30');
      p.form.controls.target.setValue('100');
    });
    expect(el.querySelector('#mix-correction [role="alert"]')?.textContent).toContain('targetPercent');
  });

  it('propylene glycol at 60 % by volume has a freeze point (-51.1 °C)', async () => {
    const el = await render((p) => {
      p.form.controls.glycol.setValue('propylene');
      p.form.controls.percent.setValue('60');
    });
    expect(el.querySelector('#freeze-point')!.textContent).toContain('-51.1 °C');
  });

  it('shows the explanation panel', async () => {
    const el = await render(() => undefined);
    expect(el.textContent).toContain('cavitation');
    expect(el.textContent).toContain('children and animals');
  });

  it('typed in the field: junk marks it invalid and names the problem; a number gives the answer', async () => {
    const fixture = TestBed.createComponent(CalculatorsPage);
    fixture.detectChanges();
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const input = el.querySelector<HTMLInputElement>('#freeze-point input')!;
    input.value = '4o';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(fixture.componentInstance.form.controls.percent.hasError('decimal')).toBe(true);
    expect(el.querySelector('#freeze-point [role="alert"]')?.textContent).toContain('Type a number');
    input.value = '40';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(fixture.componentInstance.form.controls.percent.valid).toBe(true);
    expect(el.querySelector('#freeze-point [role="alert"]')).toBeNull();
    expect(el.querySelector('#freeze-point .answer')?.textContent).toContain('Freeze point');
  });

  it('a cap typed in psi is converted: 15 psi gauge + 14.7 psi = 29.7 psi absolute (1 psi = 6.894757 kPa, NIST SP 811)', async () => {
    TestBed.inject(PreferencesService).update({ pressure: 'psi' });
    const el = await render((p) => p.form.controls.cap.setValue('15'));
    const card = el.querySelector('#boiling-point')!.textContent ?? '';
    expect(card).toContain('at 29.7 psi absolute');
    expect(card).toContain('cap 15 psi + 14.7 psi standard atmosphere');
  });
});
