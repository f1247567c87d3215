import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import {
  ConcentrationBasis,
  CoolantInputError,
  GlycolType,
  assessFreezeProtection,
  boilingPointC,
  checkMakeUpWater,
  correctMix,
  freezeTable,
  percentForFreezePoint,
} from '../../../shared/coolant';
import { fromCelsius, fromKpa, gallonsToLitres, litresToGallons, toCelsius, toKpa, UNIT_SYMBOL } from '../../../shared/units';
import { PreferencesService } from '../core/preferences.service';
import { AdditiveForm, parseNumber } from './additive-form';
import { CoolantCautions } from './coolant-cautions';
import { CoolantExplainer } from './coolant-explainer';
import { decimalText, formValue } from '../ui/form-value';
import { JwQuantitiesPipe } from '../ui/quantity-text';

type Outcome<T> = { value: T; error: null } | { value: null; error: string } | { value: null; error: null };

/** Run a shared computation on typed inputs: nothing until filled in, the field-naming message on bad input. */
function run<T>(inputs: (number | null)[], fn: () => T): Outcome<T> {
  if (inputs.some((v) => v === null)) return { value: null, error: null };
  if (inputs.some((v) => Number.isNaN(v))) return { value: null, error: 'Type a number (use a point for decimals).' };
  try {
    return { value: fn(), error: null };
  } catch (e) {
    if (e instanceof CoolantInputError) return { value: null, error: e.message };
    throw e;
  }
}

/** Coolant calculators, computed in the browser with the same shared code the server uses; units by preference. */
@Component({
  selector: 'jw-calculators-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatCardModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonToggleModule,
    MatIconModule,
    AdditiveForm,
    CoolantCautions,
    CoolantExplainer,
    JwQuantitiesPipe,
  ],
  templateUrl: './calculators-page.html',
  styleUrl: './calculators-page.scss',
})
export class CalculatorsPage {
  private readonly prefs = inject(PreferencesService);
  private readonly fb = inject(NonNullableFormBuilder);
  protected readonly tUnit = computed(() => UNIT_SYMBOL[this.prefs.temperatureUnit()]);
  protected readonly pUnit = computed(() => UNIT_SYMBOL[this.prefs.pressureUnit()]);
  protected readonly vUnit = computed(() => UNIT_SYMBOL[this.prefs.volumeUnit()]);
  protected readonly temp = (c: number) => `${fromCelsius(c, this.prefs.temperatureUnit()).toFixed(1)} ${this.tUnit()}`;
  protected readonly vol = (l: number) => `${(this.prefs.volumeUnit() === 'gal' ? litresToGallons(l) : l).toFixed(1)} ${this.vUnit()}`;

  /** Every input of the page: text as typed (parsed in the answers below, so a field can name the junk). */
  readonly form = this.fb.group({
    // shared mix inputs
    glycol: ['ethylene' as GlycolType],
    basis: ['volume' as ConcentrationBasis],
    // freeze point
    percent: ['50', decimalText],
    // glycol needed
    design: ['', decimalText],
    // boiling point
    cap: ['', decimalText],
    boilPercent: ['50', decimalText],
    // mix correction; the additive level before and the liquid's strength (optional) give the dose that restores what the drain removes
    mixCapacity: ['', decimalText],
    measured: ['', decimalText],
    target: ['50', decimalText],
    premix: ['', decimalText],
    mixSca: ['', decimalText],
    mixStrength: ['', decimalText],
    // make-up water
    water: this.fb.group({
      chlorideMgL: ['', decimalText],
      sulfateMgL: ['', decimalText],
      hardnessMgLCaCO3: ['', decimalText],
      tdsMgL: ['', decimalText],
      pH: ['', decimalText],
      conductivityUsCm: ['', decimalText],
    }),
  });
  protected readonly f = this.form.controls;
  protected readonly water = this.form.controls.water.controls;
  private readonly value = formValue(this.form);
  protected readonly glycol = computed(() => this.value().glycol);
  protected readonly basis = computed(() => this.value().basis);

  // freeze point
  protected readonly freeze = computed(() => {
    const p = parseNumber(this.value().percent);
    return run([p], () => assessFreezeProtection(this.glycol(), p!, this.basis()));
  });
  protected readonly tableSource = computed(() => freezeTable(this.glycol()).source);

  // glycol needed
  protected readonly needed = computed(() => {
    const t = parseNumber(this.value().design);
    return run([t], () => percentForFreezePoint(this.glycol(), toCelsius(t!, this.prefs.temperatureUnit()), this.basis()));
  });

  // boiling point
  protected readonly boiling = computed(() => {
    const v = this.value();
    const cap = parseNumber(v.cap);
    const p = parseNumber(v.boilPercent);
    return run([cap, p], () => ({
      capped: boilingPointC(toKpa(cap!, this.prefs.pressureUnit()), this.glycol(), p!, this.basis()),
      open: boilingPointC(0, this.glycol(), p!, this.basis()),
      capKpa: toKpa(cap!, this.prefs.pressureUnit()),
      /** The cap as it was entered, in the unit it was entered in. */
      capText: `${v.cap.trim()} ${this.pUnit()}`,
    }));
  });
  /** A pressure in the user's unit (kPa whole, psi one decimal, bar two). */
  protected readonly pressure = (kpa: number) => {
    const unit = this.prefs.pressureUnit();
    return `${fromKpa(kpa, unit).toFixed(unit === 'kPa' ? 1 : unit === 'psi' ? 1 : 2)} ${UNIT_SYMBOL[unit]}`;
  };

  // mix correction
  protected readonly mix = computed(() => {
    const v = this.value();
    const cap = parseNumber(v.mixCapacity);
    const m = parseNumber(v.measured);
    const t = parseNumber(v.target);
    const pre = parseNumber(v.premix);
    const sca = parseNumber(v.mixSca);
    const strength = parseNumber(v.mixStrength);
    if ([pre, sca, strength].some((v) => v !== null && Number.isNaN(v)))
      return { value: null, error: 'Type a number (use a point for decimals).' } as Outcome<never>;
    return run([cap, m, t], () =>
      correctMix({
        capacityL: this.prefs.volumeUnit() === 'gal' ? gallonsToLitres(cap!) : cap!,
        measuredPercent: m!,
        targetPercent: t!,
        premixPercent: pre ?? undefined,
        scaUnitsPerGal: sca ?? undefined,
        liquidUnitsPerLitre: strength ?? undefined,
      }),
    );
  });

  // make-up water
  protected readonly waterCheck = computed(() => {
    const values = Object.fromEntries(Object.entries(this.value().water).map(([k, s]) => [k, parseNumber(s)]));
    if (Object.values(values).every((v) => v === null)) return { value: null, error: null } as Outcome<never>;
    if (Object.values(values).some((v) => Number.isNaN(v))) return { value: null, error: 'Type numbers only (use a point for decimals).' } as Outcome<never>;
    const sample = Object.fromEntries(Object.entries(values).filter(([, v]) => v !== null)) as Record<string, number>;
    return run([], () => checkMakeUpWater(sample));
  });
}
