import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, FormBuilder, FormControl, ReactiveFormsModule, ValidationErrors, Validators } from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { CoolantService } from '../coolant/coolant.service';
import { PreferencesService } from '../core/preferences.service';
import {
  differenceForEntry,
  differenceSymbol,
  temperatureForEntry,
  temperatureFromEntry,
  temperatureLimitsForEntry,
  temperatureSymbol,
} from '../ui/temperature-entry';
import { AdminService } from './admin.service';
import { Site } from './admin-types';
import { applyServerError, errorText } from './form-errors';

/** The IANA zones this browser knows; the server checks with the same Intl data. */
const ZONES: string[] = (() => {
  try {
    return (Intl as unknown as { supportedValuesOf?: (k: string) => string[] }).supportedValuesOf?.('timeZone') ?? [];
  } catch {
    return [];
  }
})();

/** The server's range for a site's lowest expected temperature (server/routes/sites.ts). */
export const DESIGN_LOW_MIN_C = -80;
export const DESIGN_LOW_MAX_C = 40;

export function timeZoneValidator(control: AbstractControl): ValidationErrors | null {
  const tz = String(control.value ?? '').trim();
  if (!tz) return null;
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return null;
  } catch {
    return { timeZone: true };
  }
}

@Component({
  selector: 'jw-site-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatAutocompleteModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>{{ site ? 'Change site ' + site.name : 'Add a site' }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content class="fields">
        <mat-form-field>
          <mat-label>Name</mat-label>
          <input matInput formControlName="name" required />
          <mat-error>{{ err('name') }}</mat-error>
        </mat-form-field>
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Time zone</mat-label>
          <input matInput formControlName="timeZone" [matAutocomplete]="zones" required />
          <mat-autocomplete #zones="matAutocomplete">
            @for (z of matches(); track z) {
              <mat-option [value]="z">{{ z }}</mat-option>
            }
          </mat-autocomplete>
          <mat-hint>IANA name, e.g. America/Chicago. Schedules and day boundaries of the site use it.</mat-hint>
          <mat-error>{{ err('timeZone') }}</mat-error>
        </mat-form-field>
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>Lowest expected temperature</mat-label>
          <input matInput type="number" inputmode="decimal" formControlName="designLow" data-test="design-low" />
          <span matTextSuffix>{{ tempSymbol }}</span>
          <mat-hint
            >The coldest the engines here must stand (local climate data or the site's design figure). Blank: freeze protection is not judged.
            @if (marginText(); as m) {
              Coolant must freeze at least {{ m }} below it (the margin is set under Administration, Additive).
            }
          </mat-hint>
          <mat-error>{{ err('designLow', tempSymbol) }}</mat-error>
        </mat-form-field>
        @if (formError(); as e) {
          <p class="form-error" role="alert">{{ e }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">{{ site ? 'Save changes' : 'Add site' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .fields {
      display: flex;
      flex-direction: column;
      gap: 12px;
      min-width: min(420px, 80vw);
      max-width: 520px;
    }
    .form-error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class SiteDialog {
  protected readonly site = inject<Site | null>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<SiteDialog, Site>>(MatDialogRef);
  private readonly api = inject(AdminService);
  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);
  private readonly unit = inject(PreferencesService).temperatureUnit();
  protected readonly tempSymbol = temperatureSymbol(this.unit);
  private readonly lowLimits = temperatureLimitsForEntry(DESIGN_LOW_MIN_C, DESIGN_LOW_MAX_C, this.unit);
  /** "5 K" / "9 °F": the admin's freeze margin in the user's unit (none shown until loaded). */
  protected readonly marginText = signal<string | null>(null);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    name: [this.site?.name ?? '', [Validators.required, Validators.maxLength(120), Validators.pattern(/\S/)]],
    timeZone: [this.site?.timeZone ?? Intl.DateTimeFormat().resolvedOptions().timeZone ?? 'UTC', [Validators.required, timeZoneValidator]],
    /** In the user's unit (°C or °F); blank = not set. */
    designLow: new FormControl<number | null>(
      this.site?.designLowTempC === null || this.site?.designLowTempC === undefined ? null : temperatureForEntry(this.site.designLowTempC, this.unit),
      [Validators.min(this.lowLimits.min), Validators.max(this.lowLimits.max)],
    ),
  });
  private readonly typed = toSignal(this.form.controls.timeZone.valueChanges, { initialValue: this.form.controls.timeZone.value });
  protected readonly matches = computed(() => {
    const q = (this.typed() ?? '').toLowerCase();
    return ZONES.filter((z) => z.toLowerCase().includes(q)).slice(0, 50);
  });

  constructor() {
    inject(CoolantService)
      .chemistryLimits()
      .subscribe({
        next: (v) => this.marginText.set(`${differenceForEntry(v.limits.freezeMarginK, this.unit)} ${differenceSymbol(this.unit)}`),
        error: () => this.marginText.set(null),
      });
  }

  protected err(name: 'name' | 'timeZone' | 'designLow', unit = ''): string {
    return errorText(this.form.controls[name], unit);
  }

  /** °C for the server: sent only when changed, so a value shown rounded in °F is not rewritten. */
  private designLowTempC(): { designLowTempC?: number | null } {
    const c = this.form.controls.designLow;
    if (this.site && !c.dirty) return {};
    const v = c.value;
    if (v === null || String(v) === '') return this.site ? { designLowTempC: null } : {};
    return { designLowTempC: Math.round(temperatureFromEntry(Number(v), this.unit) * 100) / 100 };
  }

  protected save(): void {
    this.form.markAllAsTouched();
    this.formError.set(null);
    if (this.form.invalid) return;
    const v = { name: this.form.controls.name.value.trim(), timeZone: this.form.controls.timeZone.value.trim(), ...this.designLowTempC() };
    this.saving.set(true);
    (this.site ? this.api.updateSite(this.site.id, v) : this.api.createSite(v)).subscribe({
      next: (s) => this.ref.close(s),
      error: (err) => {
        this.saving.set(false);
        this.formError.set(applyServerError(this.form, err, { designLowTempC: 'designLow' }));
      },
    });
  }
}
