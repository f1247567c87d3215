import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { Alarm } from './alarm-types';

export interface NoteDialogData {
  alarm: Alarm;
  /** 'acknowledge': the note is optional; 'note': a note is the point. */
  mode: 'acknowledge' | 'note';
}

/** Acknowledge with an optional note, or add a note to an alarm. Closes with the note text ('' for none). */
@Component({
  selector: 'jw-note-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2 mat-dialog-title>{{ data.mode === 'acknowledge' ? 'Acknowledge alarm' : 'Add a note' }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()">
      <mat-dialog-content>
        <p>
          <strong>{{ data.alarm.title }}</strong> on {{ data.alarm.engineName ?? 'engine ' + data.alarm.engineId }}
        </p>
        <mat-form-field appearance="outline" class="note">
          <mat-label>{{ data.mode === 'acknowledge' ? 'Note (optional)' : 'Note' }}</mat-label>
          <textarea matInput [formControl]="note" rows="3" maxlength="1000"></textarea>
          @if (note.invalid) {
            <mat-error>Write the note first.</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" class="confirm">{{ data.mode === 'acknowledge' ? 'Acknowledge' : 'Add note' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .note {
      width: 100%;
      min-width: min(28em, 80vw);
    }
  `,
})
export class NoteDialog {
  protected readonly data = inject<NoteDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<NoteDialog, string>);
  readonly note = new FormControl('', {
    nonNullable: true,
    validators: this.data.mode === 'note' ? [Validators.required, Validators.pattern(/\S/), Validators.maxLength(1000)] : [Validators.maxLength(1000)],
  });
  readonly form = new FormGroup({ note: this.note });

  submit(): void {
    this.note.markAsTouched();
    if (this.note.invalid) return;
    this.ref.close(this.note.value.trim());
  }
}
