import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { PreferencesService } from '../core/preferences.service';
import { AdminService } from './admin.service';
import { Engine, EngineInput, Site } from './admin-types';
import { ENGINE_LIMITS_SI, EngineFormValue, UnitField, displayLimits, engineToForm, formToInput, unitLabel } from './engine-units';
import { applyServerError, errorText } from './form-errors';

export interface EngineFormData {
  engine: Engine | null;
  sites: Site[];
}

const lim = ENGINE_LIMITS_SI;

/**
 * Add or change an engine. Capacity, cap pressure and temperatures are typed in the user's units;
 * what is sent is always SI. A change sends only the fields that were edited, so a value shown rounded
 * in another unit is never written back slightly off.
 */
@Component({
  selector: 'jw-engine-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatCheckboxModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>{{ data.engine ? 'Change engine ' + data.engine.name : 'Add an engine' }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content class="grid">
        <mat-form-field class="wide">
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" maxlength="120" required />
          <mat-error>{{ err('name') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Site</mat-label>
          <mat-select formControlName="siteId" required>
            @for (s of data.sites; track s.id) {
              <mat-option [value]="s.id">{{ s.name }}</mat-option>
            }
          </mat-select>
          <mat-error>{{ err('siteId') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Duty</mat-label>
          <mat-select formControlName="duty">
            <mat-option value="standby">Standby</mat-option>
            <mat-option value="prime">Prime</mat-option>
            <mat-option value="continuous">Continuous</mat-option>
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Coolant</mat-label>
          <mat-select formControlName="coolantFamily">
            <mat-option value="conventional">Conventional (with SCA)</mat-option>
            <mat-option value="extended-life">Extended-life</mat-option>
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Glycol</mat-label>
          <mat-select formControlName="glycolType">
            <mat-option value="ethylene">Ethylene glycol</mat-option>
            <mat-option value="propylene">Propylene glycol</mat-option>
          </mat-select>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Glycol by volume</mat-label>
          <input matInput type="number" formControlName="glycolPercent" step="1" />
          <span matTextSuffix>%</span>
          <mat-error>{{ err('glycolPercent', '%') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Cooling-system capacity</mat-label>
          <input matInput type="number" formControlName="capacityL" step="any" required />
          <span matTextSuffix>{{ unit('capacityL') }}</span>
          <mat-error>{{ err('capacityL', unit('capacityL')) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Pressure cap rating (gauge)</mat-label>
          <input matInput type="number" formControlName="capPressureKpa" step="any" />
          <span matTextSuffix>{{ unit('capPressureKpa') }}</span>
          <mat-error>{{ err('capPressureKpa', unit('capPressureKpa')) }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Oil-drain interval</mat-label>
          <input matInput type="number" formControlName="oilDrainIntervalH" step="1" />
          <span matTextSuffix>h</span>
          <mat-error>{{ err('oilDrainIntervalH', 'h') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Run hours</mat-label>
          <input matInput type="number" formControlName="runHours" step="any" />
          <span matTextSuffix>h</span>
          <mat-error>{{ err('runHours', 'h') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Coolant safe to open below</mat-label>
          <input matInput type="number" formControlName="safeOpenTempC" step="any" />
          <span matTextSuffix>{{ unit('safeOpenTempC') }}</span>
          <mat-error>{{ err('safeOpenTempC', unit('safeOpenTempC')) }}</mat-error>
        </mat-form-field>
        <div class="heater">
          <mat-checkbox formControlName="hasHeater">Has a jacket-water heater</mat-checkbox>
          @if (form.controls.hasHeater.value) {
            <mat-form-field>
              <mat-label>Heater setpoint</mat-label>
              <input matInput type="number" formControlName="heaterSetpointC" step="any" required />
              <span matTextSuffix>{{ unit('heaterSetpointC') }}</span>
              <mat-error>{{ err('heaterSetpointC', unit('heaterSetpointC')) }}</mat-error>
            </mat-form-field>
          }
        </div>
        <mat-checkbox formControlName="outOfService">Out of service (alarms from it are held back)</mat-checkbox>
        @if (formError(); as e) {
          <p class="form-error" role="alert">{{ e }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">{{ data.engine ? 'Save changes' : 'Add engine' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .grid {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(220px, 1fr));
      gap: 0 16px;
    }
    .wide {
      grid-column: 1 / -1;
    }
    // The suffix span is ours (so the emulated styles reach it): keep "US gal" on one line.
    [matTextSuffix] {
      white-space: nowrap;
    }
    .heater {
      display: flex;
      flex-direction: column;
      gap: 4px;
    }
    .form-error {
      grid-column: 1 / -1;
      color: var(--jw-alarm-high);
    }
  `,
})
export class EngineForm {
  protected readonly data = inject<EngineFormData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<EngineForm, Engine>>(MatDialogRef);
  private readonly api = inject(AdminService);
  private readonly prefs = inject(PreferencesService);
  /** Units are fixed while the dialog is open, so a change of preference cannot reinterpret typed numbers. */
  private readonly units = { ...this.prefs.preferences() };

  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);

  private readonly limits = (f: UnitField) => displayLimits(f, this.units);
  private readonly initial: EngineFormValue = engineToForm(this.data.engine, this.units);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly form = this.fb.group({
    name: [this.initial.name, [Validators.required, Validators.maxLength(120), Validators.pattern(/\S/)]],
    siteId: [this.initial.siteId as number | null, Validators.required],
    duty: [this.initial.duty],
    coolantFamily: [this.initial.coolantFamily],
    glycolType: [this.initial.glycolType],
    glycolPercent: [this.initial.glycolPercent, range(lim.glycolPercent)],
    capacityL: [this.initial.capacityL, range(this.limits('capacityL'))],
    capPressureKpa: [this.initial.capPressureKpa, range(this.limits('capPressureKpa'))],
    oilDrainIntervalH: [this.initial.oilDrainIntervalH, range(lim.oilDrainIntervalH)],
    runHours: [this.initial.runHours, range(lim.runHours)],
    safeOpenTempC: [this.initial.safeOpenTempC, range(this.limits('safeOpenTempC'))],
    hasHeater: [this.initial.hasHeater],
    heaterSetpointC: [this.initial.heaterSetpointC, [Validators.min(this.limits('heaterSetpointC').min), Validators.max(this.limits('heaterSetpointC').max)]],
    outOfService: [this.initial.outOfService],
  });

  protected unit(field: UnitField): string {
    return unitLabel(field, this.units);
  }

  protected err(name: keyof typeof this.form.controls, unit = ''): string {
    return errorText(this.form.controls[name], unit);
  }

  /** The form's value converted to SI as the API takes it; for a change only the edited fields. */
  body(): Partial<EngineInput> {
    const v = this.form.getRawValue() as EngineFormValue;
    if (!this.data.engine) return formToInput(v, this.units);
    const edited = new Set<keyof EngineInput>();
    for (const [name, control] of Object.entries(this.form.controls)) {
      if (!control.dirty) continue;
      edited.add(name === 'hasHeater' ? 'heaterSetpointC' : (name as keyof EngineInput));
    }
    return formToInput(v, this.units, edited);
  }

  protected save(): void {
    const heater = this.form.controls.heaterSetpointC;
    heater.setValidators(this.form.controls.hasHeater.value ? [Validators.required, ...rangeList(this.limits('heaterSetpointC'))] : []);
    heater.updateValueAndValidity();
    this.form.markAllAsTouched();
    this.formError.set(null);
    if (this.form.invalid) return;
    const body = this.body();
    if (this.data.engine && Object.keys(body).length === 0) {
      this.ref.close();
      return;
    }
    this.saving.set(true);
    const call = this.data.engine ? this.api.updateEngine(this.data.engine.id, body) : this.api.createEngine(body as EngineInput);
    call.subscribe({
      next: (engine) => this.ref.close(engine),
      error: (err) => {
        this.saving.set(false);
        this.formError.set(applyServerError(this.form, err));
      },
    });
  }
}

function rangeList(r: { min: number; max: number }) {
  return [Validators.min(r.min), Validators.max(r.max)];
}
function range(r: { min: number; max: number }) {
  return [Validators.required, ...rangeList(r)];
}
