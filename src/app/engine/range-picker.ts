import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { browserZone, zoneAbbreviation } from '../ui/time-format';
import { PRESET_LABEL, RangePreset, TREND_NOW, TrendRange, customRange, fromLocalInput, presetRange, toLocalInput } from './trend-range';

const PRESETS: RangePreset[] = ['1h', '24h', '7d', '30d', 'custom'];

/** Chooses the trend's time window: a span ending now, or a typed from/to in the page's time zone (the site's). */
@Component({
  selector: 'jw-range-picker',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonToggleModule, MatFormFieldModule, MatInputModule, MatButtonModule],
  template: `
    <mat-button-toggle-group class="presets" hideSingleSelectionIndicator [value]="shownPreset()" (change)="choose($event.value)" aria-label="Time range">
      @for (p of presets; track p) {
        <mat-button-toggle [value]="p">{{ label[p] }}</mat-button-toggle>
      }
    </mat-button-toggle-group>
    @if (shownPreset() === 'custom') {
      <form class="custom" [formGroup]="custom" (ngSubmit)="applyCustom()">
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>From</mat-label>
          <input matInput type="datetime-local" formControlName="from" required />
        </mat-form-field>
        <mat-form-field subscriptSizing="dynamic">
          <mat-label>To</mat-label>
          <input matInput type="datetime-local" formControlName="to" required />
        </mat-form-field>
        <button mat-stroked-button type="submit">Show</button>
        @if (customError(); as e) {
          <span class="error" role="alert">{{ e }}</span>
        }
        <span class="zone">Times in {{ zoneText() }}</span>
      </form>
    }
  `,
  styles: `
    :host {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
    }
    .custom {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px;
    }
    .error {
      color: var(--jw-alarm-high);
    }
    .zone {
      color: var(--jw-muted-text);
      font-size: 12px;
    }
  `,
})
export class RangePicker {
  private readonly now = inject(TREND_NOW);

  /** The window shown now (its preset is highlighted). */
  readonly value = input<TrendRange | null>(null);
  readonly valueChange = output<TrendRange>();

  protected readonly presets = PRESETS;
  protected readonly label = PRESET_LABEL;
  /** The zone typed times are read in (the site's, or the browser's by preference); the browser's when not given. */
  readonly zone = input<string | null>(null);
  private readonly shownZone = computed(() => this.zone() || browserZone());
  protected readonly zoneText = computed(() => `${this.shownZone()} (${zoneAbbreviation(this.now(), this.shownZone())})`);

  private readonly editingCustom = signal(false);
  protected readonly shownPreset = computed<RangePreset | null>(() => (this.editingCustom() ? 'custom' : (this.value()?.preset ?? null)));
  protected readonly custom = new FormGroup({ from: new FormControl('', { nonNullable: true }), to: new FormControl('', { nonNullable: true }) });
  protected readonly customError = signal<string | null>(null);

  protected choose(preset: RangePreset): void {
    this.customError.set(null);
    if (preset === 'custom') {
      // Start from the window on screen, so a small change is a small edit.
      const v = this.value();
      const now = this.now();
      const z = this.shownZone();
      this.custom.setValue({ from: toLocalInput(v?.from ?? now - 24 * 3600_000, z), to: toLocalInput(v?.to ?? now, z) });
      this.editingCustom.set(true);
      return;
    }
    this.editingCustom.set(false);
    this.valueChange.emit(presetRange(preset, this.now()));
  }

  protected applyCustom(): void {
    const from = fromLocalInput(this.custom.controls.from.value, this.shownZone());
    const to = fromLocalInput(this.custom.controls.to.value, this.shownZone());
    if (from === null || to === null) {
      this.customError.set('Enter both a start and an end.');
      return;
    }
    const range = customRange(from, to, this.now());
    if (!range) {
      this.customError.set(from >= to ? 'The start must be before the end.' : 'The start must be in the past.');
      return;
    }
    this.customError.set(null);
    this.editingCustom.set(false);
    this.valueChange.emit(range);
  }
}
