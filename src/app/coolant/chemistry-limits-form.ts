import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { CHEMISTRY_LIMIT_SOURCES, ChemistryLimits } from '../../../shared/coolant';
import { PreferencesService } from '../core/preferences.service';
import { differenceForEntry, differenceFromEntry, differenceSymbol } from '../ui/temperature-entry';
import { CoolantService } from './coolant.service';
import { ChemistryLimitsView } from './coolant-types';

/** Administration: the limits coolant tests are judged by, and the extended-life coolant extender interval. */
@Component({
  selector: 'jw-chemistry-limits-form',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2>Coolant chemistry limits</h2>
    <p class="lead">
      Each measured field of a coolant test is judged against these. Defaults: pH from {{ src.ph }}; nitrite, molybdate and reserve alkalinity are
      {{ src.nitrite }}; the freeze margin is common practice. Enter the coolant maker's figures where they differ.
    </p>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate class="form">
      <div class="row">
        <mat-form-field
          ><mat-label>Nitrite, lowest</mat-label><input matInput type="number" formControlName="nitriteLowPpm" /><span matTextSuffix>ppm</span></mat-form-field
        >
        <mat-form-field
          ><mat-label>Nitrite, highest</mat-label><input matInput type="number" formControlName="nitriteHighPpm" /><span matTextSuffix
            >ppm</span
          ></mat-form-field
        >
      </div>
      <div class="row">
        <mat-form-field
          ><mat-label>Molybdate, lowest</mat-label><input matInput type="number" formControlName="molybdateLowPpm" /><span matTextSuffix
            >ppm</span
          ></mat-form-field
        >
        <mat-form-field
          ><mat-label>Molybdate, highest</mat-label><input matInput type="number" formControlName="molybdateHighPpm" /><span matTextSuffix
            >ppm</span
          ></mat-form-field
        >
      </div>
      <div class="row">
        <mat-form-field><mat-label>pH, lowest</mat-label><input matInput type="number" formControlName="phLow" /></mat-form-field>
        <mat-form-field><mat-label>pH, highest</mat-label><input matInput type="number" formControlName="phHigh" /></mat-form-field>
      </div>
      <div class="row">
        <mat-form-field
          ><mat-label>Reserve alkalinity, lowest</mat-label><input matInput type="number" formControlName="reserveAlkalinityLowMl" /><span matTextSuffix
            >mL</span
          ></mat-form-field
        >
        <mat-form-field
          ><mat-label>Freeze margin below the design low</mat-label
          ><input matInput type="number" formControlName="freezeMargin" data-test="freeze-margin" /><span matTextSuffix>{{ marginSymbol }}</span>
          <mat-hint>Each site's lowest expected temperature is set under Administration, Sites.</mat-hint></mat-form-field
        >
      </div>
      <h3>Extended-life coolant extender</h3>
      <p class="lead">Blank for the common-practice placeholder ({{ extenderDefault() }}); the coolant maker's interval belongs here.</p>
      <div class="row">
        <mat-form-field
          ><mat-label>Every</mat-label><input matInput type="number" formControlName="extenderHours" /><span matTextSuffix>run hours</span></mat-form-field
        >
        <mat-form-field
          ><mat-label>or every</mat-label><input matInput type="number" formControlName="extenderDays" /><span matTextSuffix>days</span></mat-form-field
        >
      </div>
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
      @if (saved()) {
        <p class="ok" role="status">Saved.</p>
      }
      <div><button mat-flat-button type="submit" [disabled]="saving()">Save limits</button></div>
    </form>
  `,
  styles: `
    .lead {
      color: var(--jw-muted-text);
    }
    .form {
      display: flex;
      flex-direction: column;
      gap: 4px;
    }
    .row {
      display: flex;
      gap: 12px;
      flex-wrap: wrap;
    }
    mat-form-field {
      min-width: 240px;
    }
    h2 {
      font-size: 1.1rem;
      margin: 16px 0 4px;
    }
    h3 {
      font-size: 1rem;
      margin: 8px 0 0;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class ChemistryLimitsForm {
  private readonly api = inject(CoolantService);
  private readonly fb = inject(FormBuilder);
  protected readonly src = CHEMISTRY_LIMIT_SOURCES;
  protected readonly error = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly saved = signal(false);
  protected readonly extenderDefault = signal('6000 h or 1095 days');
  /** The margin is a temperature difference: typed in K, or in °F for US units. */
  private readonly unit = inject(PreferencesService).temperatureUnit();
  protected readonly marginSymbol = differenceSymbol(this.unit);
  private loadedMarginK: number | null = null;

  private readonly num = (v: number | null = null) => this.fb.control<number | null>(v, [Validators.min(0)]);
  protected readonly form = this.fb.group({
    nitriteLowPpm: this.num(),
    nitriteHighPpm: this.num(),
    molybdateLowPpm: this.num(),
    molybdateHighPpm: this.num(),
    phLow: this.num(),
    phHigh: this.num(),
    reserveAlkalinityLowMl: this.num(),
    freezeMargin: this.num(),
    extenderHours: this.num(),
    extenderDays: this.num(),
  });

  constructor() {
    this.api.chemistryLimits().subscribe({ next: (v) => this.fill(v), error: (e) => this.error.set(this.message(e)) });
  }

  private fill(v: ChemistryLimitsView): void {
    this.loadedMarginK = v.limits.freezeMarginK;
    this.form.patchValue({
      ...v.limits,
      freezeMargin: differenceForEntry(v.limits.freezeMarginK, this.unit),
      extenderHours: v.extender?.everyHours ?? null,
      extenderDays: v.extender?.everyDays ?? null,
    });
    this.form.markAsPristine();
    this.extenderDefault.set(`${v.extenderDefault.everyHours} h or ${v.extenderDefault.everyDays} days`);
  }

  protected save(): void {
    this.saved.set(false);
    const v = this.form.getRawValue();
    const limits: Partial<ChemistryLimits> = {};
    for (const k of ['nitriteLowPpm', 'nitriteHighPpm', 'molybdateLowPpm', 'molybdateHighPpm', 'phLow', 'phHigh', 'reserveAlkalinityLowMl'] as const) {
      if (v[k] !== null && String(v[k]) !== '') limits[k] = Number(v[k]);
    }
    // unchanged: the stored K (a margin shown rounded in °F is not rewritten); changed: converted from the user's unit
    const margin = this.form.controls.freezeMargin;
    if (!margin.dirty && this.loadedMarginK !== null) limits.freezeMarginK = this.loadedMarginK;
    else if (v.freezeMargin !== null && String(v.freezeMargin) !== '')
      limits.freezeMarginK = Math.round(differenceFromEntry(Number(v.freezeMargin), this.unit) * 1000) / 1000;
    const hasExt = (v.extenderHours !== null && String(v.extenderHours) !== '') || (v.extenderDays !== null && String(v.extenderDays) !== '');
    const extender = hasExt
      ? { everyHours: v.extenderHours === null ? null : Number(v.extenderHours), everyDays: v.extenderDays === null ? null : Number(v.extenderDays) }
      : null;
    this.saving.set(true);
    this.error.set(null);
    this.api.saveChemistryLimits({ ...limits, extender }).subscribe({
      next: (r) => {
        this.saving.set(false);
        this.fill(r);
        this.saved.set(true);
      },
      error: (e) => {
        this.saving.set(false);
        this.error.set(this.message(e));
      },
    });
  }

  private message(e: unknown): string {
    if (e instanceof HttpErrorResponse) return `${e.error?.field ? e.error.field + ': ' : ''}${e.error?.error ?? e.message}`;
    return String(e);
  }
}
