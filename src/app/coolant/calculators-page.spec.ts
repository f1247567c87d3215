import { TestBed } from '@angular/core/testing';
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
      p.mixCapacityText.set('100');
      p.measuredText.set('40');
      p.targetText.set('50');
      p.premixText.set('50');
      p.mixScaText.set('2');
      p.mixStrengthText.set('10');
    });
    const card = el.querySelector('#mix-correction')!.textContent ?? '';
    expect(card).toContain('drain completely and refill with premix');
    expect(card).toContain('removes 100 % of its additive');
    // 2 units/US gal x 100 L / 3.785411784 = 52.8 units; / 10 units/L = 5.28 L -> 5.30 L
    expect(card).toContain('Add 5.30 L of liquid additive');
  });

  it('a target above 60 % is refused naming targetPercent', async () => {
    const el = await render((p) => {
      p.mixCapacityText.set('400');
      p.measuredText.set('30');
      p.targetText.set('100');
    });
    expect(el.querySelector('#mix-correction [role="alert"]')?.textContent).toContain('targetPercent');
  });

  it('propylene glycol at 60 % by volume has a freeze point (-51.1 °C)', async () => {
    const el = await render((p) => {
      p.glycol.set('propylene');
      p.percentText.set('60');
    });
    expect(el.querySelector('#freeze-point')!.textContent).toContain('-51.1 °C');
  });

  it('shows the explanation panel', async () => {
    const el = await render(() => undefined);
    expect(el.textContent).toContain('cavitation');
    expect(el.textContent).toContain('children and animals');
  });
});
