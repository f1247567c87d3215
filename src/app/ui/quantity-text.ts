import { Pipe, PipeTransform, inject } from '@angular/core';
import { KPA_PER_BAR, KPA_PER_PSI, LITRES_PER_US_GALLON, cToF } from '../../../shared/units';
import { PreferencesService } from '../core/preferences.service';
import type { UnitPreferences } from './unit-format';

/** Digits after the point as the source number wrote them (at least `min`), and enough for two significant digits of `converted`. */
function decimalsOf(n: string, min: number, converted?: number): number {
  const written = n.includes('.') ? n.split('.')[1].length : 0;
  const abs = Math.abs(converted ?? 0);
  const significant = abs > 0 && abs < 1 ? Math.min(4, 1 - Math.floor(Math.log10(abs))) : 0;
  return Math.max(min, written, significant);
}

function fixed(v: number, d: number): string {
  return v.toFixed(d).replace(/^-(0(\.0+)?)$/, '$1');
}

const US_FL_OZ_ML = (LITRES_PER_US_GALLON * 1000) / 128;

/**
 * The quantities inside an explanation written by the shared code (which speaks SI: L, mL, kPa, °C), rewritten in
 * the user's units: "5.30 L for 170.3 L" -> "1.40 US gal for 45.0 US gal". A litre figure already followed by its
 * US gallons in brackets keeps only the gallons. Rates such as "units/L" and "mg/L" are left alone (not volumes).
 * Precision follows the number as written, so the text does not claim more than the source.
 */
export function localizeQuantities(text: string, prefs: UnitPreferences): string {
  let out = text;
  if (prefs.volume === 'gal') {
    out = out.replace(/(-?\d+(?:\.\d+)?) L \((-?\d+(?:\.\d+)?) US gal\)/g, '$2 US gal');
    out = out.replace(/(?<![\w/])(-?\d+(?:\.\d+)?) L\b(?!\/)/g, (_m, n: string) => {
      const g = Number(n) / LITRES_PER_US_GALLON;
      return `${fixed(g, decimalsOf(n, 1, g))} US gal`;
    });
    out = out.replace(/(?<![\w/])(\d+(?:\.\d+)?) mL\b(?!\/)/g, (_m, n: string) => `${fixed(Number(n) / US_FL_OZ_ML, 2)} US fl oz`);
  }
  if (prefs.pressure !== 'kPa') {
    const per = prefs.pressure === 'psi' ? KPA_PER_PSI : KPA_PER_BAR;
    const min = prefs.pressure === 'psi' ? 1 : 2;
    out = out.replace(/(?<![\w/])(-?\d+(?:\.\d+)?) kPa\b/g, (_m, n: string) => `${fixed(Number(n) / per, min)} ${prefs.pressure}`);
  }
  if (prefs.temperature === 'degF') {
    out = out.replace(/(-?\d+(?:\.\d+)?) ?°C/g, (_m, n: string) => `${fixed(cToF(Number(n)), decimalsOf(n, 0))} °F`);
  }
  return out;
}

/** `{{ reason | jwQuantities }}`: an explanation in the user's units (see localizeQuantities). */
@Pipe({ name: 'jwQuantities' })
export class JwQuantitiesPipe implements PipeTransform {
  private readonly prefs = inject(PreferencesService);
  transform(text: string | null | undefined): string {
    return text ? localizeQuantities(text, this.prefs.preferences()) : '';
  }
}
