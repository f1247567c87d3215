import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { SHELVE_MAX_MINUTES, SHELVE_MIN_MINUTES } from '../../../shared/alarms/alarm-state';
import { Alarm } from './alarm-types';

export interface ShelveResult {
  minutes: number;
  reason: string;
}

/** Whole minutes within the limits of shared/alarms/alarm-state.ts. */
const wholeMinutes = Validators.pattern(/^\d+$/);
const notBlank = Validators.pattern(/\S/);

/** Shelve an alarm for a limited time; both the time and a reason are required (ISA-18.2 shelving). */
@Component({
  selector: 'jw-shelve-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>Shelve alarm</h2>
    <form [formGroup]="form" (ngSubmit)="submit()">
      <mat-dialog-content>
        <p class="what">
          <strong>{{ data.alarm.title }}</strong> on {{ data.alarm.engineName ?? 'engine ' + data.alarm.engineId }}
        </p>
        <p class="hint">A shelved alarm is not shown as active until its time runs out; it then comes back if the condition is still there.</p>
        <mat-form-field appearance="outline" class="minutes">
          <mat-label>For how long (minutes)</mat-label>
          <input matInput type="number" formControlName="minutes" [min]="min" [max]="max" step="1" required />
          <mat-hint>{{ min }} to {{ max }} minutes</mat-hint>
          @if (form.controls.minutes.hasError('required')) {
            <mat-error>Enter how many minutes.</mat-error>
          } @else if (form.controls.minutes.invalid) {
            <mat-error>A whole number of minutes from {{ min }} to {{ max }}.</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline" class="reason">
          <mat-label>Reason</mat-label>
          <textarea matInput formControlName="reason" rows="3" maxlength="500" required></textarea>
          @if (form.controls.reason.invalid) {
            <mat-error>Say why the alarm is shelved.</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" class="confirm">Shelve</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .minutes,
    .reason {
      width: 100%;
    }
    .hint {
      color: var(--jw-muted-text);
      margin-top: 0;
    }
  `,
})
export class ShelveDialog {
  protected readonly data = inject<{ alarm: Alarm }>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<ShelveDialog, ShelveResult>);
  protected readonly min = SHELVE_MIN_MINUTES;
  protected readonly max = SHELVE_MAX_MINUTES;

  readonly form = new FormGroup({
    minutes: new FormControl<number | null>(60, [Validators.required, Validators.min(SHELVE_MIN_MINUTES), Validators.max(SHELVE_MAX_MINUTES), wholeMinutes]),
    reason: new FormControl('', { nonNullable: true, validators: [Validators.required, notBlank, Validators.maxLength(500)] }),
  });

  submit(): void {
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    const { minutes, reason } = this.form.getRawValue();
    this.ref.close({ minutes: Number(minutes), reason: reason.trim() });
  }
}
