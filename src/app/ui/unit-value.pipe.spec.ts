import { TestBed } from '@angular/core/testing';
import { PreferencesService } from '../core/preferences.service';
import { UnitValuePipe } from './unit-value.pipe';

// Expected values are worked by hand from the exact factors of NIST Special Publication 811 (2008), Appendix B:
//   t/°F = 1.8 t/°C + 32;   1 psi (lbf/in²) = 6.894 757 E+03 Pa;   1 bar = 1.0 E+05 Pa;   1 gallon (U.S.) = 3.785 412 E-03 m³.
describe('UnitValuePipe', () => {
  let pipe: UnitValuePipe;
  let prefs: PreferencesService;

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({});
    prefs = TestBed.inject(PreferencesService);
    pipe = TestBed.runInInjectionContext(() => new UnitValuePipe());
  });

  it('shows metric stored values with their symbols', () => {
    prefs.useSystem('metric');
    expect(pipe.transform(82.44, 'coolant_temp')).toBe('82.4 °C');
    expect(pipe.transform(96.5, 'coolant_pressure')).toBe('97 kPa');
    expect(pipe.transform(1250, 'coolant_conductivity')).toBe('1,250 µS/cm');
    expect(pipe.transform(1800, 'engine_speed')).toBe('1,800 rpm');
    expect(pipe.transform(200, 'volume')).toBe('200 L');
  });

  it('converts temperature to °F (NIST SP 811: t/°F = 1.8 t/°C + 32)', () => {
    prefs.useSystem('us');
    expect(pipe.transform(100, 'coolant_temp')).toBe('212.0 °F'); // water boils at 100 °C = 212 °F
    expect(pipe.transform(0, 'temperature')).toBe('32.0 °F');
    expect(pipe.transform(-40, 'ambient_temp')).toBe('-40.0 °F'); // the scales cross at -40
    expect(pipe.transform(85, 'coolant_temp')).toBe('185.0 °F');
  });

  it('converts a temperature difference without the 32 °F offset', () => {
    prefs.useSystem('us');
    expect(pipe.transform(10, 'temperature-difference')).toBe('18.0 °F');
  });

  it('converts pressure to psi (NIST SP 811: 1 psi = 6.894 757 kPa) and to bar (1 bar = 100 kPa)', () => {
    prefs.useSystem('us');
    expect(pipe.transform(6.894757, 'coolant_pressure', 3)).toBe('1.000 psi');
    expect(pipe.transform(100, 'coolant_pressure', 2)).toBe('14.50 psi'); // 100 / 6.894757 = 14.5038
    expect(pipe.transform(103.4, 'pressure')).toBe('15.0 psi'); // a 15 psi cap
    prefs.update({ pressure: 'bar' });
    expect(pipe.transform(96.5, 'coolant_pressure')).toBe('0.97 bar');
  });

  it('converts volume to US gallons (NIST SP 811: 1 gal = 3.785 412 L)', () => {
    prefs.useSystem('us');
    expect(pipe.transform(3.785411784, 'volume', 3)).toBe('1.000 US gal');
    expect(pipe.transform(200, 'volume')).toBe('52.8 US gal'); // 200 / 3.785412 = 52.834
  });

  it('keeps conductivity and speed in their only units', () => {
    prefs.useSystem('us');
    expect(pipe.transform(4321, 'coolant_conductivity')).toBe('4,321 µS/cm');
    expect(pipe.transform(1500, 'engine_speed')).toBe('1,500 rpm');
  });

  it('shows a dash for a missing or non-finite value, never a made-up number', () => {
    expect(pipe.transform(null, 'coolant_temp')).toBe('—');
    expect(pipe.transform(undefined, 'coolant_pressure')).toBe('—');
    expect(pipe.transform(Number.NaN, 'coolant_pressure')).toBe('—');
  });

  it('follows a change of preference at once', () => {
    prefs.useSystem('metric');
    expect(pipe.transform(90, 'coolant_temp')).toBe('90.0 °C');
    prefs.update({ temperature: 'degF' });
    expect(pipe.transform(90, 'coolant_temp')).toBe('194.0 °F');
  });
});
