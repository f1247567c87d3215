import { gateSettings } from '../../server/services/work-orders/gate';
import { loadOpeningTimings } from '../../server/services/work-orders/opening-settings';

// The safe defaults are the trade's common practice (stopped 10 min, held 2 min) kept in shared/work/opening-check.ts.
describe('opening-check timings from the environment', () => {
  it('keeps the safe defaults when nothing is set', () => {
    expect(loadOpeningTimings({})).toEqual({ minStoppedS: 600, holdS: 120 });
    expect(loadOpeningTimings({ OPENING_MIN_STOPPED_S: '', OPENING_HOLD_S: '' })).toEqual({ minStoppedS: 600, holdS: 120 });
  });

  it('reads OPENING_MIN_STOPPED_S and OPENING_HOLD_S', () => {
    expect(loadOpeningTimings({ OPENING_MIN_STOPPED_S: '20', OPENING_HOLD_S: '5.5' })).toEqual({ minStoppedS: 20, holdS: 5.5 });
  });

  it('refuses values that are not seconds', () => {
    expect(() => loadOpeningTimings({ OPENING_HOLD_S: 'soon' })).toThrow(/OPENING_HOLD_S/);
    expect(() => loadOpeningTimings({ OPENING_MIN_STOPPED_S: '-1' })).toThrow(/OPENING_MIN_STOPPED_S/);
  });

  it('puts them into the gate settings next to the engine values', () => {
    const s = gateSettings({ safeOpenTempC: 45, heaterSetpointC: 38 }, 20, { minStoppedS: 20, holdS: 5 });
    expect(s).toMatchObject({ minStoppedS: 20, holdS: 5, safeOpenTempC: 45, heaterSetpointC: 38, ambientC: 20, maxPressureKpa: 7 });
  });
});
