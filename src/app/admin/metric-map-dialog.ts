import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormArray, FormBuilder, FormGroup, ReactiveFormsModule, Validators, type FormControl } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { CHANNELS, CHANNEL_KEYS, type ChannelKey } from '../../../shared/channels';
import { AdminService } from './admin.service';
import { Device, MetricMapEntry } from './admin-types';
import { applyServerError } from './form-errors';

/** Units a mapping entry may state, per channel (as the JSON contract accepts them; shared/telemetry-payload.ts). */
const UNITS: Record<string, string[]> = {
  temperature: ['degC', 'degF', 'K'],
  pressure: ['kPa', 'psi', 'bar'],
  conductivity: ['uS/cm', 'mS/cm'],
  speed: ['rpm'],
};
const UNIT_TEXT: Record<string, string> = {
  degC: '°C',
  degF: '°F',
  K: 'K',
  kPa: 'kPa',
  psi: 'psi',
  bar: 'bar',
  'uS/cm': 'µS/cm',
  'mS/cm': 'mS/cm',
  rpm: 'rpm',
};

type Row = FormGroup<{ name: FormControl<string>; channel: FormControl<ChannelKey | ''>; unit: FormControl<string> }>;

/**
 * A Sparkplug gateway's metric names to our channels, for names a gateway already uses
 * ("Engine/Coolant/Temp"). Names not listed are taken as our channel keys. The unit here counts only
 * when the birth certificate gives none. Saving asks the edge node for a rebirth (server/routes/devices.ts).
 */
@Component({
  selector: 'jw-metric-map-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Metric names of {{ device.username }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <p class="hint">
          Sparkplug {{ device.sparkplug?.groupId }} / {{ device.sparkplug?.edgeNodeId
          }}{{ device.sparkplug?.deviceId ? ' / ' + device.sparkplug?.deviceId : '' }}. Names not listed here are read as our channel keys ({{
            keys.join(', ')
          }}). The unit is used only when the gateway's birth certificate states none. On saving, the edge node is asked for new birth certificates (NCMD Node
          Control/Rebirth), so a change applies at once.
        </p>
        <div formArrayName="rows" class="rows">
          @for (row of rows.controls; track row; let i = $index) {
            <div class="row" [formGroupName]="i">
              <mat-form-field subscriptSizing="dynamic" class="name">
                <mat-label>Metric name</mat-label>
                <input matInput formControlName="name" autocomplete="off" />
              </mat-form-field>
              <mat-form-field subscriptSizing="dynamic" class="channel">
                <mat-label>Channel</mat-label>
                <mat-select formControlName="channel">
                  @for (k of keys; track k) {
                    <mat-option [value]="k">{{ channelText(k) }}</mat-option>
                  }
                </mat-select>
              </mat-form-field>
              <mat-form-field subscriptSizing="dynamic" class="unit">
                <mat-label>Unit if not sent</mat-label>
                <mat-select formControlName="unit">
                  <mat-option value="">stored unit</mat-option>
                  @for (u of unitsOf(row.controls.channel.value); track u) {
                    <mat-option [value]="u">{{ unitText[u] }}</mat-option>
                  }
                </mat-select>
              </mat-form-field>
              <button mat-icon-button type="button" (click)="rows.removeAt(i)" [attr.aria-label]="'Remove ' + (row.controls.name.value || 'row')">
                <mat-icon fontIcon="delete" />
              </button>
            </div>
          }
        </div>
        <button mat-stroked-button type="button" (click)="addRow()"><mat-icon fontIcon="add" />Add a name</button>
        @if (formError(); as e) {
          <p class="form-error" role="alert">{{ e }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">Save names</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .hint {
      color: var(--jw-muted-text);
      max-width: 720px;
    }
    .rows {
      display: grid;
      gap: 8px;
      margin-bottom: 12px;
    }
    .row {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
      align-items: center;
    }
    .name {
      flex: 1 1 220px;
    }
    .channel {
      width: 280px;
    }
    .unit {
      width: 150px;
    }
    .form-error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class MetricMapDialog {
  protected readonly device = inject<Device>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<MetricMapDialog, Device>>(MatDialogRef);
  private readonly api = inject(AdminService);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly keys = CHANNEL_KEYS;
  protected readonly unitText = UNIT_TEXT;
  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly rows = new FormArray<Row>([]);
  protected readonly form = this.fb.group({ rows: this.rows });

  constructor() {
    for (const [name, entry] of Object.entries(this.device.metricMap ?? {})) {
      const e = typeof entry === 'string' ? { channel: entry } : entry;
      this.addRow(name, e.channel as ChannelKey, e.unit ?? '');
    }
    if (!this.rows.length) this.addRow();
  }

  protected addRow(name = '', channel: ChannelKey | '' = '', unit = ''): void {
    this.rows.push(
      this.fb.group({
        name: [name, [Validators.required, Validators.maxLength(200)]],
        channel: [channel as ChannelKey | '', Validators.required],
        unit: [unit],
      }),
    );
  }

  protected channelText(k: ChannelKey): string {
    return `${CHANNELS[k].label} (${k})`;
  }

  protected unitsOf(k: ChannelKey | ''): string[] {
    return k ? UNITS[CHANNELS[k].quantity] : [];
  }

  protected save(): void {
    this.form.markAllAsTouched();
    this.formError.set(null);
    const filled = this.rows.controls.filter((r) => r.controls.name.value.trim() || r.controls.channel.value);
    if (filled.some((r) => r.invalid)) return void this.formError.set('Each row needs a metric name and a channel.');
    const map: Record<string, MetricMapEntry> = {};
    for (const r of filled) {
      const name = r.controls.name.value.trim();
      if (map[name]) return void this.formError.set(`"${name}" is listed twice.`);
      const channel = r.controls.channel.value as ChannelKey;
      const unit = r.controls.unit.value;
      map[name] = unit && this.unitsOf(channel).includes(unit) ? { channel, unit } : channel;
    }
    this.saving.set(true);
    this.api.setMetricMap(this.device.id, map).subscribe({
      next: (d) => this.ref.close(d),
      error: (err) => {
        this.saving.set(false);
        this.formError.set(applyServerError(this.form, err));
      },
    });
  }
}
