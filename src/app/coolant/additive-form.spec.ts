import { TestBed } from '@angular/core/testing';
import { AdditiveForm } from './additive-form';

/**
 * The additive form's decision display. Limits 1.2 to 3.0 units/US gal and a dose of one US pint per
 * 4 US gal when low are common practice; 1 US gal = 3.785411784 L, 1 US pint = 0.473176473 L (NIST SP 811).
 */
describe('AdditiveForm', () => {
  beforeEach(() => localStorage.clear());

  async function render(sca: string, capacity: string, inputs: Record<string, unknown> = {}) {
    const fixture = TestBed.createComponent(AdditiveForm);
    for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
    fixture.componentInstance.form.controls.sca.setValue(sca);
    fixture.componentInstance.form.controls.capacity.setValue(capacity);
    fixture.detectChanges();
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    return {
      el,
      status: el.querySelector('[data-test="status"]')?.textContent?.trim() ?? null,
      filter: el.querySelector('[data-test="filter"]')?.textContent?.trim() ?? null,
      dose: el.querySelector('[data-test="dose"]')?.textContent?.trim() ?? null,
    };
  }

  it('low reading: charged filter and the dose for the capacity in litres (80 L = 21.13 US gal -> 5.28 pt = 2.50 L)', async () => {
    const v = await render('0.8', '80');
    expect(v.status).toBe('Additive low');
    expect(v.filter).toBe('Charged filter');
    expect(v.dose).toBe('2.50 L (5.3 US pt)');
    expect(v.el.querySelector('[data-test="reasons"]')?.textContent).toContain('below 1.20 units/US gal');
    expect(v.el.textContent).toContain('wear gloves and eye protection');
  });

  it.each([
    ['1.2', 'Additive in range', 'Charged filter'],
    ['3.0', 'Additive in range', 'Charged filter'],
    ['3.01', 'Additive high', 'Blank filter (no additive)'],
  ])('%s units/US gal -> %s, %s, no dose', async (sca, status, filter) => {
    const v = await render(sca, '80');
    expect(v.status).toBe(status);
    expect(v.filter).toBe(filter);
    expect(v.dose).toBe('None');
  });

  it('extended-life: says there is no strip decision and why', async () => {
    const v = await render('0.5', '80', { coolantFamily: 'extended-life' });
    expect(v.status).toBe('No strip decision');
    expect(v.el.textContent).toContain('test strips do not measure');
  });

  it('bad input names the field and shows no decision', async () => {
    const v = await render('-1', '80');
    expect(v.status).toBeNull();
    expect(v.el.querySelector('[role="alert"]')?.textContent).toContain('scaUnitsPerGal');
    const w = await render('2', '0');
    expect(w.el.querySelector('[role="alert"]')?.textContent).toContain('capacityL');
  });

  it('with US units the capacity is read in US gallons and the dose shown in gallons', async () => {
    localStorage.setItem('jw.preferences', JSON.stringify({ temperature: 'degF', pressure: 'psi', volume: 'gal', theme: 'light' }));
    const v = await render('0.8', '20');
    // 20 US gal -> 5 pints = 2.366 L -> 2.35 L to the 0.05 L step; 2.35 L = 0.62 US gal
    expect(v.dose).toBe('0.62 US gal (5 US pt)');
  });
});
