import { JwTimePipe } from '../ui/time-format';
import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormArray, FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { ChemistryLimitsForm } from './chemistry-limits-form';
import { CoolantService } from './coolant.service';
import { AdditiveProfile } from './coolant-types';

/** Administration: the additive in use, from its label and the charged filters' data (no brand names). */
@Component({
  selector: 'jw-additive-profile-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [JwTimePipe, ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ChemistryLimitsForm],
  template: `
    <p class="lead">
      The liquid additive's strength and the pre-charge of each charged filter size, as printed on their labels. The dose and initial-charge calculators use
      them. Write a plain description, not a brand name.
    </p>
    @if (profile(); as p) {
      <p class="state" data-test="profile-state">
        @if (p.configured) {
          Last changed {{ p.updatedAt | jwTime: null : 'datetime' }}.
        } @else {
          <mat-icon aria-hidden="true" fontIcon="info" /> Not set yet: the initial-charge calculator asks for the strength each time.
        }
      </p>
    }
    <form [formGroup]="form" (ngSubmit)="save()" novalidate class="form">
      <mat-form-field class="wide"><mat-label>Description</mat-label><input matInput formControlName="name" maxlength="80" required /></mat-form-field>
      <mat-form-field>
        <mat-label>Liquid additive strength</mat-label>
        <input matInput inputmode="decimal" type="number" formControlName="liquidUnitsPerLitre" required />
        <span matTextSuffix>units/L</span>
        <mat-hint>{{ perGallon() }}</mat-hint>
      </mat-form-field>
      <div class="row">
        <mat-form-field
          ><mat-label>Lowest level</mat-label><input matInput type="number" formControlName="scaLow" /><span matTextSuffix>units/US gal</span></mat-form-field
        >
        <mat-form-field
          ><mat-label>Highest level</mat-label><input matInput type="number" formControlName="scaHigh" /><span matTextSuffix>units/US gal</span></mat-form-field
        >
      </div>
      <h2>Charged filter sizes</h2>
      <div formArrayName="filterSizes">
        @for (f of sizes.controls; track f; let i = $index) {
          <div class="row" [formGroupName]="i">
            <mat-form-field class="wide"
              ><mat-label>Filter {{ i + 1 }}</mat-label
              ><input matInput formControlName="label" maxlength="60"
            /></mat-form-field>
            <mat-form-field
              ><mat-label>Pre-charge</mat-label><input matInput type="number" formControlName="prechargeUnits" /><span matTextSuffix
                >units</span
              ></mat-form-field
            >
            <button mat-icon-button type="button" (click)="sizes.removeAt(i)" [attr.aria-label]="'Remove filter ' + (i + 1)">
              <mat-icon fontIcon="delete" />
            </button>
          </div>
        }
      </div>
      <button mat-stroked-button type="button" class="add" (click)="addSize()"><mat-icon fontIcon="add" />Add a filter size</button>
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
      @if (savedAt()) {
        <p class="ok" role="status">Saved.</p>
      }
      <div><button mat-flat-button type="submit" [disabled]="saving()">Save additive profile</button></div>
    </form>
    <jw-chemistry-limits-form />
  `,
  styles: `
    :host {
      display: block;
      padding-top: 12px;
      max-width: 820px;
    }
    .lead,
    .state {
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
      align-items: flex-start;
    }
    .wide {
      min-width: 360px;
    }
    mat-form-field {
      min-width: 220px;
    }
    h2 {
      font-size: 1.1rem;
      margin: 12px 0 4px;
    }
    .add {
      align-self: flex-start;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class AdditiveProfilePage {
  private readonly api = inject(CoolantService);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly profile = signal<AdditiveProfile | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly savedAt = signal<number | null>(null);

  protected readonly form = this.fb.group({
    name: ['', [Validators.required, Validators.maxLength(80)]],
    liquidUnitsPerLitre: [null as number | null, [Validators.required, Validators.min(0.0001)]],
    scaLow: [1.2, [Validators.required, Validators.min(0)]],
    scaHigh: [3.0, [Validators.required, Validators.min(0)]],
    filterSizes: this.fb.array<ReturnType<AdditiveProfilePage['sizeGroup']>>([]),
  });
  protected get sizes(): FormArray {
    return this.form.controls.filterSizes;
  }

  constructor() {
    this.api.profile().subscribe({ next: (p) => this.fill(p), error: (e) => this.error.set(this.message(e)) });
  }

  private sizeGroup(label = '', prechargeUnits: number | null = null) {
    return this.fb.group({ label: [label, Validators.required], prechargeUnits: [prechargeUnits, [Validators.required, Validators.min(0)]] });
  }

  protected addSize(): void {
    this.form.controls.filterSizes.push(this.sizeGroup());
  }

  /** 1 US gallon = 3.785411784 L (NIST SP 811). */
  protected perGallon(): string {
    const v = Number(this.form.controls.liquidUnitsPerLitre.value);
    return v > 0 ? `${(v * 3.785411784).toFixed(2)} units per US gallon of liquid` : 'from the additive label';
  }

  private fill(p: AdditiveProfile): void {
    this.profile.set(p);
    this.form.controls.filterSizes.clear();
    for (const f of p.filterSizes) this.form.controls.filterSizes.push(this.sizeGroup(f.label, f.prechargeUnits));
    this.form.patchValue({ name: p.configured ? p.name : '', liquidUnitsPerLitre: p.liquidUnitsPerLitre, scaLow: p.limits.low, scaHigh: p.limits.high });
  }

  protected save(): void {
    this.savedAt.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.error.set('Fill in the description, a strength above 0, and each filter size with its pre-charge.');
      return;
    }
    const v = this.form.getRawValue();
    this.saving.set(true);
    this.error.set(null);
    const body = {
      name: v.name.trim(),
      liquidUnitsPerLitre: Number(v.liquidUnitsPerLitre),
      scaLow: Number(v.scaLow),
      scaHigh: Number(v.scaHigh),
      filterSizes: v.filterSizes.map((f) => ({ label: String(f.label).trim(), prechargeUnits: Number(f.prechargeUnits) })),
    };
    this.api.saveProfile(body).subscribe({
      next: (p) => {
        this.saving.set(false);
        this.fill(p);
        this.savedAt.set(Date.now());
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
