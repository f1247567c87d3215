import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
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
    FormsModule,
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
  protected readonly tUnit = computed(() => UNIT_SYMBOL[this.prefs.temperatureUnit()]);
  protected readonly pUnit = computed(() => UNIT_SYMBOL[this.prefs.pressureUnit()]);
  protected readonly vUnit = computed(() => UNIT_SYMBOL[this.prefs.volumeUnit()]);
  protected readonly temp = (c: number) => `${fromCelsius(c, this.prefs.temperatureUnit()).toFixed(1)} ${this.tUnit()}`;
  protected readonly vol = (l: number) => `${(this.prefs.volumeUnit() === 'gal' ? litresToGallons(l) : l).toFixed(1)} ${this.vUnit()}`;

  // shared mix inputs
  readonly glycol = signal<GlycolType>('ethylene');
  readonly basis = signal<ConcentrationBasis>('volume');

  // freeze point
  readonly percentText = signal('50');
  protected readonly freeze = computed(() => {
    const p = parseNumber(this.percentText());
    return run([p], () => assessFreezeProtection(this.glycol(), p!, this.basis()));
  });
  protected readonly tableSource = computed(() => freezeTable(this.glycol()).source);

  // glycol needed
  readonly designText = signal('');
  protected readonly needed = computed(() => {
    const t = parseNumber(this.designText());
    return run([t], () => percentForFreezePoint(this.glycol(), toCelsius(t!, this.prefs.temperatureUnit()), this.basis()));
  });

  // boiling point
  readonly capText = signal('');
  readonly boilPercentText = signal('50');
  protected readonly boiling = computed(() => {
    const cap = parseNumber(this.capText());
    const p = parseNumber(this.boilPercentText());
    return run([cap, p], () => ({
      capped: boilingPointC(toKpa(cap!, this.prefs.pressureUnit()), this.glycol(), p!, this.basis()),
      open: boilingPointC(0, this.glycol(), p!, this.basis()),
      capKpa: toKpa(cap!, this.prefs.pressureUnit()),
      /** The cap as it was entered, in the unit it was entered in. */
      capText: `${this.capText().trim()} ${this.pUnit()}`,
    }));
  });
  /** A pressure in the user's unit (kPa whole, psi one decimal, bar two). */
  protected readonly pressure = (kpa: number) => {
    const unit = this.prefs.pressureUnit();
    return `${fromKpa(kpa, unit).toFixed(unit === 'kPa' ? 1 : unit === 'psi' ? 1 : 2)} ${UNIT_SYMBOL[unit]}`;
  };

  // mix correction
  readonly mixCapacityText = signal('');
  readonly measuredText = signal('');
  readonly targetText = signal('50');
  readonly premixText = signal('');
  /** Optional: the additive level before and the liquid's strength, for the dose that restores what the drain removes. */
  readonly mixScaText = signal('');
  readonly mixStrengthText = signal('');
  protected readonly mix = computed(() => {
    const cap = parseNumber(this.mixCapacityText());
    const m = parseNumber(this.measuredText());
    const t = parseNumber(this.targetText());
    const pre = parseNumber(this.premixText());
    const sca = parseNumber(this.mixScaText());
    const strength = parseNumber(this.mixStrengthText());
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
  readonly water = {
    chlorideMgL: signal(''),
    sulfateMgL: signal(''),
    hardnessMgLCaCO3: signal(''),
    tdsMgL: signal(''),
    pH: signal(''),
    conductivityUsCm: signal(''),
  };
  protected readonly waterCheck = computed(() => {
    const values = Object.fromEntries(Object.entries(this.water).map(([k, s]) => [k, parseNumber(s())]));
    if (Object.values(values).every((v) => v === null)) return { value: null, error: null } as Outcome<never>;
    if (Object.values(values).some((v) => Number.isNaN(v))) return { value: null, error: 'Type numbers only (use a point for decimals).' } as Outcome<never>;
    const sample = Object.fromEntries(Object.entries(values).filter(([, v]) => v !== null)) as Record<string, number>;
    return run([], () => checkMakeUpWater(sample));
  });
}
