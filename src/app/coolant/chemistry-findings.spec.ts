import { TestBed } from '@angular/core/testing';
import { judgeChemistry } from '../../../shared/coolant';
import { ChemistryFindings } from './chemistry-findings';
import { CoolantExplainer } from './coolant-explainer';

/**
 * Findings display. Limits: nitrite 800-3200 ppm (common practice, from memory); pH 7.5-11.0 (ASTM D3306 / D6210,
 * from memory); freeze margin 5 K (common practice). -40 °C = -40 °F (°F = °C x 9/5 + 32, NIST SP 811).
 */
describe('ChemistryFindings', () => {
  beforeEach(() => localStorage.clear());

  async function render(findings: ReturnType<typeof judgeChemistry>) {
    const fixture = TestBed.createComponent(ChemistryFindings);
    fixture.componentRef.setInput('findings', findings);
    fixture.detectChanges();
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('low nitrite and short freeze protection: each state in words, its action, abnormal marked', async () => {
    const el = await render(judgeChemistry({ nitritePpm: 600, ph: 9, freezePointC: -28 }, { glycolType: 'propylene', designLowC: -30 }));
    const nitrite = el.querySelector('[data-test="finding-nitritePpm"]')!;
    expect(nitrite.textContent).toContain('Nitrite: Low');
    expect(nitrite.textContent).toContain('600 ppm');
    expect(nitrite.textContent).toContain('Action');
    expect(nitrite.classList).toContain('abnormal');
    const ph = el.querySelector('[data-test="finding-ph"]')!;
    expect(ph.textContent).toContain('pH: In range');
    expect(ph.classList).not.toContain('abnormal');
    const freeze = el.querySelector('[data-test="finding-freezeProtection"]')!;
    expect(freeze.textContent).toContain('Short of the design low');
    expect(freeze.textContent).toContain('-28.0 °C');
    expect(freeze.textContent).toContain('Raise the glycol');
  });

  it("the freeze point is shown in the user's unit: -40 °C = -40.0 °F", async () => {
    localStorage.setItem('jw.preferences', JSON.stringify({ temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light' }));
    const el = await render(judgeChemistry({ freezePointC: -40 }, { glycolType: 'ethylene', designLowC: -30 }));
    expect(el.querySelector('[data-test="finding-freezeProtection"]')!.textContent).toContain('-40.0 °F');
  });

  it('nothing measured: nothing shown', async () => {
    const el = await render([]);
    expect(el.querySelector('ul')).toBeNull();
  });
});

describe('CoolantExplainer', () => {
  it('says what the additive does, too little and too much, where the rules come from, and the cautions', async () => {
    const fixture = TestBed.createComponent(CoolantExplainer);
    fixture.detectChanges();
    await fixture.whenStable();
    const text = (fixture.nativeElement as HTMLElement).textContent ?? '';
    expect(text).toContain('cavitation');
    expect(text).toContain('deposits and gel');
    expect(text).toContain('common practice');
    expect(text).toContain('ASTM D3306');
    expect(text).toContain('children and animals');
    expect(text).toContain('coolant filters');
    expect(text).toContain('Never open a hot, pressurised cooling system');
  });
});
