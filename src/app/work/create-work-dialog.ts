import { finalize } from 'rxjs';
import { ChangeDetectionStrategy, Component, ElementRef, inject, signal, viewChild } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { provideNativeDateAdapter } from '@angular/material/core';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { checkDueDate, MAX_DUE, MIN_DUE } from './due-date';
import { WorkApi, errorText } from './work-api';
import { Assignee, WorkOrderDetail, WorkTemplate } from './work-types';

export interface CreateWorkData {
  engineId: number;
  engineName: string;
  /** The kind suggested by the due task or the alarm's rule. */
  kind: string;
  alarmId?: number;
  title?: string;
  /** The due task's key: sent when the order keeps the task's kind, so completing it records the task done. */
  serviceTaskKey?: string;
  /** What the suggestion comes from, in words ("Due task: Weekly inspection", "Alarm #12"). */
  from: string;
}

/**
 * Before a work order is created from a due row or an alarm: the kind (suggested), who does it and by when.
 * Closes with the created work order, or undefined when the planner steps back.
 */
@Component({
  selector: 'jw-create-work-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatDatepickerModule, ReactiveFormsModule],
  providers: [provideNativeDateAdapter()],
  template: `
    <h2 mat-dialog-title>Create work order: {{ data.engineName }}</h2>
    <mat-dialog-content>
      <p class="from">{{ data.from }}</p>
      <form [formGroup]="form" class="form" (ngSubmit)="create()">
        <mat-form-field appearance="outline">
          <mat-label>Kind of work</mat-label>
          <mat-select formControlName="kind">
            @for (t of templates(); track t.kind) {
              <mat-option [value]="t.kind">{{ t.title }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Assign to</mat-label>
          <mat-select formControlName="assigneeId">
            <mat-option [value]="null">Not yet</mat-option>
            @for (a of assignees(); track a.id) {
              <mat-option [value]="a.id">{{ a.name }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Due date</mat-label>
          <input matInput formControlName="due" [matDatepicker]="picker" [min]="minDue" [max]="maxDue" #dueInput />
          <mat-datepicker-toggle matIconSuffix [for]="picker" />
          <mat-datepicker #picker />
        </mat-form-field>
      </form>
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="undefined">Back</button>
      <button mat-flat-button type="button" [disabled]="busy() || form.invalid" (click)="create()">Create</button>
    </mat-dialog-actions>
  `,
  styles: `
    .form {
      display: grid;
      gap: 4px;
      min-width: min(420px, 80vw);
    }
    .from {
      color: var(--jw-muted-text);
      margin-top: 0;
    }
    .error {
      color: var(--jw-alarm-high);
      font-weight: 600;
    }
  `,
})
export class CreateWorkDialog {
  protected readonly data = inject<CreateWorkData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<CreateWorkDialog, WorkOrderDetail>>(MatDialogRef);
  private readonly api = inject(WorkApi);
  protected readonly templates = signal<WorkTemplate[]>([]);
  protected readonly assignees = signal<Assignee[]>([]);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly minDue = MIN_DUE;
  protected readonly maxDue = MAX_DUE;
  private readonly dueInput = viewChild<ElementRef<HTMLInputElement>>('dueInput');
  protected readonly form = new FormGroup({
    kind: new FormControl(this.data.kind, { nonNullable: true, validators: [Validators.required] }),
    assigneeId: new FormControl<number | null>(null),
    due: new FormControl<Date | null>(null),
  });

  constructor() {
    this.api.templates().subscribe({ next: (t) => this.templates.set(t), error: (e) => this.error.set(errorText(e)) });
    this.api.assignees().subscribe({ next: (a) => this.assignees.set(a), error: () => undefined });
  }

  protected create(): void {
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    const due = checkDueDate(v.due, this.dueInput()?.nativeElement.value ?? '');
    if (!due.ok) return void this.error.set(`Due date: ${due.message}`);
    this.busy.set(true);
    this.error.set(null);
    this.api
      .create({
        engineId: this.data.engineId,
        kind: v.kind,
        ...(this.data.alarmId ? { alarmId: this.data.alarmId } : {}),
        ...(this.data.title ? { title: this.data.title } : {}),
        ...(v.assigneeId ? { assigneeId: v.assigneeId } : {}),
        ...(due.value ? { dueDate: due.value } : {}),
        ...(this.data.serviceTaskKey && v.kind === this.data.kind ? { serviceTaskKey: this.data.serviceTaskKey } : {}),
      })
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({ next: (o) => this.ref.close(o), error: (e: unknown) => this.error.set(errorText(e)) });
  }
}
