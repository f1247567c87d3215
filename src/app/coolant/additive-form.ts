import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { AdditiveDecision, CoolantFamily, CoolantInputError, ScaLimits, decideAdditive } from '../../../shared/coolant';
import { gallonsToLitres, litresToGallons } from '../../../shared/units';
import { PreferencesService } from '../core/preferences.service';
import { decimalText, formValue } from '../ui/form-value';
import { AdditiveDecisionView } from './additive-decision';

/** Parse a typed number; null for blank, NaN for junk (so the check can name the field). */
export const parseNumber = (text: string | null | undefined): number | null => {
  const s = (text ?? '').trim().replace(',', '.');
  if (s === '') return null;
  return /^[+-]?(\d+(\.\d*)?|\.\d+)$/.test(s) ? Number(s) : NaN;
};

/** Additive dose: a strip reading and the system capacity -> the SCA decision, computed here with the shared rules. */
@Component({
  selector: 'jw-additive-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonToggleModule, AdditiveDecisionView],
  template: `
    @if (!familyLocked()) {
      <div class="row">
        <mat-button-toggle-group [formControl]="form.controls.family" aria-label="Coolant family">
          <mat-button-toggle value="conventional">Conventional</mat-button-toggle>
          <mat-button-toggle value="extended-life">Extended-life</mat-button-toggle>
        </mat-button-toggle-group>
      </div>
    }
    @if (capacityLocked() || scaDriven()) {
      <p class="fixed">
        For {{ familyLocked() ? (family() === 'extended-life' ? 'extended-life' : 'conventional') + ' coolant' : 'this coolant' }}
        @if (capacityLocked()) {
          in this engine's {{ capacityText() }} {{ volumeUnit() === 'gal' ? 'US gal' : 'L' }}
        }
        @if (scaDriven()) {
          , with the SCA reading typed above
        }
        .
      </p>
    }
    @if (!scaDriven() || !capacityLocked()) {
      <div class="row">
        @if (!scaDriven()) {
          <mat-form-field>
            <mat-label>SCA reading</mat-label>
            <input matInput inputmode="decimal" name="sca" [formControl]="form.controls.sca" data-test="sca" />
            <span matTextSuffix>units/US gal</span>
            @if (error()?.field === 'scaUnitsPerGal') {
              <mat-hint class="err" role="alert">{{ error()!.message }}</mat-hint>
            }
          </mat-form-field>
        }
        @if (!capacityLocked()) {
          <mat-form-field>
            <mat-label>Cooling-system capacity</mat-label>
            <input matInput inputmode="decimal" name="capacity" [formControl]="form.controls.capacity" data-test="capacity" />
            <span matTextSuffix>{{ volumeUnit() === 'gal' ? 'US gal' : 'L' }}</span>
            @if (error()?.field === 'capacityL') {
              <mat-hint class="err" role="alert">{{ error()!.message }}</mat-hint>
            }
          </mat-form-field>
        }
      </div>
    }
    @if (error(); as e) {
      @if ((scaDriven() && e.field === 'scaUnitsPerGal') || (capacityLocked() && e.field === 'capacityL')) {
        <p class="err" role="alert">{{ e.message }}</p>
      }
    }
    <jw-additive-decision [decision]="decision()" />
  `,
  styles: `
    .row {
      display: flex;
      flex-wrap: wrap;
      gap: 12px;
      margin-bottom: 8px;
    }
    .err {
      color: var(--jw-alarm-high);
    }
    .fixed {
      color: var(--jw-muted-text);
      margin: 0 0 8px;
    }
  `,
})
export class AdditiveForm {
  private readonly prefs = inject(PreferencesService);
  /** Given by the engine page: the engine's capacity in litres and family (then fixed). */
  readonly capacityL = input<number | null>(null);
  readonly coolantFamily = input<CoolantFamily | null>(null);
  readonly limits = input<ScaLimits | null>(null);
  /** A reading typed elsewhere (the record form) drives this form when given. */
  readonly scaUnitsPerGal = input<number | null | undefined>(undefined);

  protected readonly volumeUnit = this.prefs.volumeUnit;
  protected readonly familyLocked = computed(() => this.coolantFamily() !== null);
  protected readonly capacityLocked = computed(() => this.capacityL() !== null);
  /** The SCA reading comes from the form around this one: no second field for it. */
  protected readonly scaDriven = computed(() => this.scaUnitsPerGal() !== undefined);
  /** The fields shown when the engine page does not fix them: family, SCA reading, capacity in the user's unit. */
  readonly form = inject(NonNullableFormBuilder).group({
    family: ['conventional' as CoolantFamily],
    sca: ['', decimalText],
    capacity: ['', decimalText],
  });
  private readonly value = formValue(this.form);
  /** What the decision uses: the engine's facts when given, else what was typed here. */
  readonly family = computed<CoolantFamily>(() => this.coolantFamily() ?? this.value().family);
  private readonly scaText = computed(() => {
    if (!this.scaDriven()) return this.value().sca;
    const v = this.scaUnitsPerGal();
    return v === null || v === undefined ? '' : String(v);
  });
  /** The capacity in the user's unit: the engine's (rounded to 0.1) or as typed. */
  protected readonly capacityText = computed(() => {
    const c = this.capacityL();
    if (c === null) return this.value().capacity;
    const v = this.volumeUnit() === 'gal' ? litresToGallons(c) : c;
    return String(Math.round(v * 10) / 10);
  });

  private readonly result = computed<{ decision: AdditiveDecision | null; error: CoolantInputError | null }>(() => {
    const sca = parseNumber(this.scaText());
    const cap = parseNumber(this.capacityText());
    if (cap === null || (sca === null && this.family() === 'conventional')) return { decision: null, error: null };
    const capacityL = this.capacityL() ?? (this.volumeUnit() === 'gal' ? gallonsToLitres(cap) : cap);
    try {
      return { decision: decideAdditive({ coolantFamily: this.family(), scaUnitsPerGal: sca, capacityL, limits: this.limits() ?? undefined }), error: null };
    } catch (e) {
      if (e instanceof CoolantInputError) return { decision: null, error: e };
      throw e;
    }
  });
  readonly decision = computed(() => this.result().decision);
  readonly error = computed(() => this.result().error);
}
