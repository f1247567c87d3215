import { ComponentFixture, TestBed } from '@angular/core/testing';
import { RUNNING_COOLANT_TEMP_BAND } from '../../../shared/normal-bands';
import { PreferencesService } from '../core/preferences.service';
import { BandIndicator } from './band-indicator';

describe('BandIndicator', () => {
  let fixture: ComponentFixture<BandIndicator>;
  let host: HTMLElement;

  function render(value: number | null, band = RUNNING_COOLANT_TEMP_BAND as typeof RUNNING_COOLANT_TEMP_BAND | null): void {
    fixture.componentRef.setInput('value', value);
    fixture.componentRef.setInput('band', band);
    fixture.detectChanges();
  }

  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({ imports: [BandIndicator] });
    TestBed.inject(PreferencesService).useSystem('metric');
    fixture = TestBed.createComponent(BandIndicator);
    fixture.componentRef.setInput('scale', { low: 0, high: 120 });
    fixture.componentRef.setInput('quantity', 'coolant_temp');
    fixture.componentRef.setInput('label', 'Coolant temperature');
    host = fixture.nativeElement as HTMLElement;
  });

  it('marks the band and places the value on the scale', () => {
    render(84);
    const band = host.querySelector<HTMLElement>('.band')!;
    expect(band.style.left).toBe(`${(70 / 120) * 100}%`);
    expect(parseFloat(band.style.width)).toBeCloseTo((25 / 120) * 100, 6);
    expect(host.querySelector<HTMLElement>('.marker')!.style.left).toBe('70%');
    expect(host.getAttribute('role')).toBe('img');
    expect(host.getAttribute('aria-label')).toBe('Coolant temperature: 84.0 °C, within normal band 70.0 °C to 95.0 °C');
    expect(host.querySelector('.word')).toBeNull();
    expect(host.querySelector('.arrow')).toBeNull();
  });

  it('says HIGH and points the arrow out of the band above it: shape and text, not colour alone', () => {
    render(101.5);
    expect(host.querySelector('.word')!.textContent!.trim()).toBe('HIGH');
    expect(host.querySelector('.arrow')!.textContent).toBe('▶');
    expect(host.querySelector('.marker')!.classList).toContain('out');
    expect(host.getAttribute('aria-label')).toContain('101.5 °C, above normal band');
  });

  it('says LOW below the band', () => {
    render(55);
    expect(host.querySelector('.word')!.textContent!.trim()).toBe('LOW');
    expect(host.querySelector('.arrow')!.textContent).toBe('◀');
    expect(host.getAttribute('aria-label')).toContain('below normal band');
  });

  it('counts the band ends as normal', () => {
    render(95);
    expect(host.querySelector('.word')).toBeNull();
    render(70);
    expect(host.querySelector('.word')).toBeNull();
  });

  it('keeps an off-scale marker on the bar edge', () => {
    render(150);
    expect(host.querySelector<HTMLElement>('.marker')!.style.left).toBe('100%');
    render(-10);
    expect(host.querySelector<HTMLElement>('.marker')!.style.left).toBe('0%');
  });

  it('without a band judges nothing and says so', () => {
    render(40, null);
    expect(host.querySelector('.band')).toBeNull();
    expect(host.querySelector('.word')).toBeNull();
    expect(host.getAttribute('aria-label')).toBe('Coolant temperature: 40.0 °C; no normal band for this state');
  });

  it('without a value shows no marker', () => {
    render(null);
    expect(host.querySelector('.marker')).toBeNull();
    expect(host.getAttribute('aria-label')).toContain('no value');
  });

  it('speaks in the preferred unit', () => {
    TestBed.inject(PreferencesService).useSystem('us');
    render(100);
    expect(host.getAttribute('aria-label')).toBe('Coolant temperature: 212.0 °F, above normal band 158.0 °F to 203.0 °F');
  });
});
