import { localizeQuantities } from './quantity-text';

const US = { temperature: 'degF', pressure: 'psi', volume: 'gal' } as const;
const SI = { temperature: 'degC', pressure: 'kPa', volume: 'L' } as const;

describe('localizeQuantities', () => {
  it('rewrites litres as US gallons and keeps the precision written (1 US gal = 3.785411784 L, NIST HB 44)', () => {
    expect(localizeQuantities('Add 5.30 L of liquid additive for 170.3 L.', US)).toBe('Add 1.40 US gal of liquid additive for 45.0 US gal.');
  });

  it('keeps only the gallons where the text already gave them', () => {
    expect(localizeQuantities('Add about one US pint per 4 US gallons: 5.30 L for 170.3 L (45.0 US gal).', US)).toBe(
      'Add about one US pint per 4 US gallons: 1.40 US gal for 45.0 US gal.',
    );
  });

  it('keeps two significant digits of small volumes (0.05 L is 0.013 US gal, not 0.01)', () => {
    expect(localizeQuantities('Rounded from 5.321 L to the nearest 0.05 L.', US)).toBe('Rounded from 1.406 US gal to the nearest 0.013 US gal.');
  });

  it('leaves rates per litre alone', () => {
    expect(localizeQuantities('at 2.1 units/L and 250 mg/L', US)).toBe('at 2.1 units/L and 250 mg/L');
  });

  it('rewrites kPa as psi (1 psi = 6.894757 kPa) and °C as °F', () => {
    expect(localizeQuantities('cap 103 kPa, boils at 122.0 °C, freezes at -37 °C', US)).toBe('cap 14.9 psi, boils at 251.6 °F, freezes at -35 °F');
  });

  it('small doses in mL become US fluid ounces', () => {
    expect(localizeQuantities('add 30 mL', US)).toBe('add 1.01 US fl oz');
  });

  it('changes nothing in metric', () => {
    const t = 'Drain 12.0 L of the 40.0 % mix; cap 103 kPa; -37 °C.';
    expect(localizeQuantities(t, SI)).toBe(t);
  });
});
