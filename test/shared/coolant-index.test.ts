/** The coolant barrel exports and the standard cautions (wording is ours; the 50 °C opening guidance is common practice of the trade). */
import * as coolant from '../../shared/coolant';

describe('shared/coolant index', () => {
  it('re-exports the computations', () => {
    for (const name of [
      'saturationTemperatureK',
      'saturationPressureMPa',
      'freezePointC',
      'percentForFreezePoint',
      'boilingPointC',
      'boilingMarginC',
      'decideAdditive',
      'initialChargeAfterRefill',
      'correctMix',
      'checkMakeUpWater',
      'coolantCaution',
    ]) {
      expect(typeof (coolant as Record<string, unknown>)[name]).toBe('function');
    }
  });
  it('cautions cover hot pressurised systems, toxicity, protection, disposal and deferring to the maker', () => {
    const all = coolant.COOLANT_CAUTIONS.map((c) => c.text).join(' ');
    expect(all).toMatch(/Never open a hot cooling system/);
    expect(all).toMatch(/50 °C \(122 °F\)/); // 50 °C = 122 °F (NIST SP 811 B.9)
    expect(all).toMatch(/first stop/);
    expect(all).toMatch(/children and animals/);
    expect(all).toMatch(/eye protection/);
    expect(all).toMatch(/local rules/);
    expect(coolant.coolantCaution('defer').text).toMatch(/engine maker's instructions, local codes and licensed practice/);
    expect(() => coolant.coolantCaution('nope' as never)).toThrow(RangeError);
  });
  it('input errors carry the field name for APIs', () => {
    try {
      coolant.freezePointC('ethylene', 99, 'mass');
      throw new Error('expected a throw');
    } catch (e) {
      expect(e).toBeInstanceOf(coolant.CoolantInputError);
      expect((e as coolant.CoolantInputError).field).toBe('percent');
    }
  });
});
