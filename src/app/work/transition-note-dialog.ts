import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';

export interface TransitionNoteData {
  /** "Cancel work order #12?" */
  title: string;
  /** What happens, in words. */
  message: string;
  /** The label of the confirming button ("Cancel the work order"). */
  confirm: string;
  /** "Why is it cancelled?" */
  noteLabel: string;
}

/**
 * Declining, cancelling and sending back ask here: the note that says why belongs to the action, and the
 * action happens only when confirmed. Closes with the note, or undefined when the user steps back.
 */
@Component({
  selector: 'jw-transition-note-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule, ReactiveFormsModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <mat-dialog-content>
      <p>{{ data.message }}</p>
      <mat-form-field appearance="outline" class="wide">
        <mat-label>{{ data.noteLabel }}</mat-label>
        <textarea matInput [formControl]="note" rows="3" maxlength="2000" cdkFocusInitial></textarea>
        @if (note.touched && note.invalid) {
          <mat-error>Write why (it goes into the history).</mat-error>
        }
      </mat-form-field>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" [mat-dialog-close]="undefined">Keep the work order as it is</button>
      <button mat-flat-button type="button" (click)="done()">{{ data.confirm }}</button>
    </mat-dialog-actions>
  `,
  styles: `
    .wide {
      width: 100%;
      min-width: 280px;
    }
  `,
})
export class TransitionNoteDialog {
  protected readonly data = inject<TransitionNoteData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<TransitionNoteDialog, string>>(MatDialogRef);
  protected readonly note = new FormControl('', { nonNullable: true, validators: [Validators.required, Validators.pattern(/\S/)] });

  protected done(): void {
    this.note.markAsTouched();
    if (this.note.invalid) return;
    this.ref.close(this.note.value.trim());
  }
}
