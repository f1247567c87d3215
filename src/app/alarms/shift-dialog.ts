import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators, AbstractControl, ValidationErrors } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';

export interface Shift { id: number; siteId: number; userId: number; userName: string | null; backupUserId: number | null; backupUserName: string | null; startsAt: string; endsAt: string }
export interface ShiftInput { siteId: number; userId: number; backupUserId: number | null; startsAt: string; endsAt: string }
/** Someone who can be on call (from GET /api/people); role when known, shown beside the name. */
export interface Person { id: number; name: string; role?: string }
export interface ShiftDialogData { shift: Shift | null; sites: { id: number; name: string }[]; people: Person[] }

/** "2026-12-02T08:00" in the browser's time zone, for a datetime-local input. */
function localInput(iso: string | number): string {
  const d = new Date(iso);
  const p = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}T${p(d.getHours())}:${p(d.getMinutes())}`;
}

function endsAfterStart(group: AbstractControl): ValidationErrors | null {
  const { startsAt, endsAt } = group.value as { startsAt: string; endsAt: string };
  return startsAt && endsAt && Date.parse(endsAt) <= Date.parse(startsAt) ? { order: true } : null;
}

/** Create or change one on-call shift: site, who, backup, from, until (the server checks roles and overlaps of people). */
@Component({
  selector: 'jw-shift-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule, MatSelectModule],
  template: `
    <h2 mat-dialog-title>{{ data.shift ? 'Change shift' : 'New shift' }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()">
      <mat-dialog-content class="fields">
        <mat-form-field appearance="outline"><mat-label>Site</mat-label>
          <mat-select formControlName="siteId" required>@for (s of data.sites; track s.id) { <mat-option [value]="s.id">{{ s.name }}</mat-option> }</mat-select>
          <mat-error>Choose a site.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"><mat-label>On call</mat-label>
          <mat-select formControlName="userId" required>@for (p of data.people; track p.id) { <mat-option [value]="p.id">{{ p.name }}@if (p.role) { ({{ p.role }}) }</mat-option> }</mat-select>
          <mat-error>Choose who is on call.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"><mat-label>Backup</mat-label>
          <mat-select formControlName="backupUserId">
            <mat-option [value]="null">No backup</mat-option>
            @for (p of data.people; track p.id) { <mat-option [value]="p.id">{{ p.name }}@if (p.role) { ({{ p.role }}) }</mat-option> }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline"><mat-label>From</mat-label>
          <input matInput type="datetime-local" formControlName="startsAt" required /><mat-error>When does it start?</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"><mat-label>Until</mat-label>
          <input matInput type="datetime-local" formControlName="endsAt" required /><mat-error>When does it end?</mat-error>
        </mat-form-field>
        @if (form.hasError('order') && form.touched) { <p class="error" role="alert">The shift must end after it starts.</p> }
        @if (form.value.backupUserId && form.value.backupUserId === form.value.userId) { <p class="error" role="alert">The backup must be someone else.</p> }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit">Save</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `.fields { display: grid; grid-template-columns: 1fr 1fr; gap: 0 12px; } .error { color: var(--jw-alarm-high); grid-column: 1 / -1; }`,
})
export class ShiftDialog {
  protected readonly data = inject<ShiftDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<ShiftDialog, ShiftInput>);
  private readonly start = this.data.shift?.startsAt ?? new Date(Math.ceil(Date.now() / 3_600_000) * 3_600_000).toISOString();

  readonly form = new FormGroup(
    {
      siteId: new FormControl<number | null>(this.data.shift?.siteId ?? this.data.sites[0]?.id ?? null, Validators.required),
      userId: new FormControl<number | null>(this.data.shift?.userId ?? null, Validators.required),
      backupUserId: new FormControl<number | null>(this.data.shift?.backupUserId ?? null),
      startsAt: new FormControl(localInput(this.start), { nonNullable: true, validators: Validators.required }),
      endsAt: new FormControl(localInput(this.data.shift?.endsAt ?? Date.parse(this.start) + 12 * 3_600_000), { nonNullable: true, validators: Validators.required }),
    },
    { validators: endsAfterStart },
  );

  submit(): void {
    this.form.markAllAsTouched();
    const v = this.form.getRawValue();
    if (this.form.invalid || (v.backupUserId !== null && v.backupUserId === v.userId)) return;
    this.ref.close({ siteId: v.siteId!, userId: v.userId!, backupUserId: v.backupUserId, startsAt: new Date(v.startsAt).toISOString(), endsAt: new Date(v.endsAt).toISOString() });
  }
}
