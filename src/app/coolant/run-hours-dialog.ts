import { JwTimePipe } from '../ui/time-format';
import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, signal, viewChild } from '@angular/core';
import { FormBuilder, FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { CoolantService } from './coolant.service';
import { RunHoursEntry } from './coolant-types';

export interface RunHoursDialogData {
  engineId: number;
  engineName: string;
  runHours: number;
}

/** Planner: set an engine's run hours from its hour meter, with a reason; the audit of earlier corrections below. */
@Component({
  selector: 'jw-run-hours-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [JwTimePipe, ReactiveFormsModule, MatButtonModule, MatDialogModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>Run hours of {{ data.engineName }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <p class="now">
          Counted now: <strong>{{ current().toFixed(1) }} h</strong> (from engine speed at or above 100 rpm).
        </p>
        <mat-form-field>
          <mat-label>Hour meter reads</mat-label>
          <input matInput type="number" inputmode="decimal" formControlName="runHours" required min="0" />
          <span matTextSuffix>h</span>
          <mat-error>At least 0 h.</mat-error>
        </mat-form-field>
        <mat-form-field class="wide">
          <mat-label>Reason</mat-label>
          <input matInput formControlName="reason" required maxlength="500" />
          <mat-hint>e.g. read from the hour meter at the monthly run</mat-hint>
          <mat-error>Say why (at least 3 characters).</mat-error>
        </mat-form-field>
        @if (error(); as e) {
          <p class="error" role="alert">{{ e }}</p>
        }
        <h3>Corrections on record</h3>
        @if (history().length) {
          <ul class="audit" aria-label="Run-hours corrections">
            @for (h of history(); track h.id) {
              <li>
                {{ h.at | jwTime: null : 'datetime' }} · {{ h.oldRunHours.toFixed(1) }} h → {{ h.newRunHours.toFixed(1) }} h ·
                {{ h.userName ?? 'unknown user' }} · “{{ h.reason }}”
              </li>
            }
          </ul>
        } @else {
          <p class="none">None yet.</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" (click)="close()">Close</button>
        <button mat-flat-button type="submit" [disabled]="saving()">Set run hours</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    mat-form-field {
      display: block;
    }
    .wide {
      min-width: 420px;
    }
    .now,
    .none {
      color: var(--jw-muted-text);
    }
    h3 {
      font-size: 1rem;
      margin: 12px 0 4px;
    }
    .audit {
      padding-left: 18px;
      margin: 0;
      font-size: 0.9rem;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class RunHoursDialog {
  protected readonly data = inject<RunHoursDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<RunHoursDialog, number | undefined>);
  private readonly api = inject(CoolantService);
  protected readonly current = signal(this.data.runHours);
  protected readonly history = signal<RunHoursEntry[]>([]);
  protected readonly error = signal<string | null>(null);
  protected readonly saving = signal(false);
  private readonly formDir = viewChild.required(FormGroupDirective);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    runHours: [Math.round(this.data.runHours * 10) / 10, [Validators.required, Validators.min(0)]],
    reason: ['', [Validators.required, Validators.minLength(3)]],
  });

  constructor() {
    this.loadHistory();
  }

  private loadHistory(): void {
    this.api.runHoursHistory(this.data.engineId).subscribe({ next: (h) => this.history.set(h), error: () => this.history.set([]) });
  }

  protected save(): void {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    this.saving.set(true);
    this.error.set(null);
    this.api.correctRunHours(this.data.engineId, Number(v.runHours), v.reason.trim()).subscribe({
      next: (r) => {
        this.saving.set(false);
        this.current.set(r.runHours);
        // a fresh form: no 'say why' error on the emptied reason
        this.formDir().resetForm({ runHours: r.runHours, reason: '' });
        this.loadHistory();
      },
      error: (e) => {
        this.saving.set(false);
        this.error.set(e instanceof HttpErrorResponse ? (e.error?.error ?? e.message) : String(e));
      },
    });
  }

  /** The dialog returns the hours now set (or undefined when nothing changed). */
  protected close(): void {
    this.ref.close(this.current() === this.data.runHours ? undefined : this.current());
  }
}
