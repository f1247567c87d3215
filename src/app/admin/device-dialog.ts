import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { AdminService } from './admin.service';
import { DeviceWithSecret, Engine } from './admin-types';
import { applyServerError, errorText } from './form-errors';

/** Add the MQTT identity a gateway reports with for one engine. Closes with the device and its one-time secret. */
@Component({
  selector: 'jw-device-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Add a device</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content class="fields">
        <mat-form-field>
          <mat-label>Engine</mat-label>
          <mat-select formControlName="engineId" required>
            @for (e of engines; track e.id) { <mat-option [value]="e.id">{{ e.name }}</mat-option> }
          </mat-select>
          <mat-error>{{ err('engineId') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>User name (optional)</mat-label>
          <input matInput formControlName="username" autocomplete="off" />
          <mat-hint>3–64 letters, digits, dot, dash or underscore. Left empty, one is made up.</mat-hint>
          <mat-error>{{ err('username') }}</mat-error>
        </mat-form-field>
        @if (formError(); as e) { <p class="form-error" role="alert">{{ e }}</p> }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">Add device</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .fields { display: flex; flex-direction: column; min-width: min(420px, 80vw); }
    .form-error { color: var(--jw-alarm-high); }
  `,
})
export class DeviceDialog {
  protected readonly engines = inject<Engine[]>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<DeviceDialog, DeviceWithSecret>>(MatDialogRef);
  private readonly api = inject(AdminService);
  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly form = inject(FormBuilder).group({
    engineId: [null as number | null, Validators.required],
    username: ['', Validators.pattern(/^[A-Za-z0-9._-]{3,64}$/)],
  });

  protected err(name: 'engineId' | 'username'): string {
    const c = this.form.controls[name];
    return c.hasError('pattern') ? '3–64 letters, digits, dot, dash or underscore.' : errorText(c);
  }

  protected save(): void {
    this.form.markAllAsTouched();
    this.formError.set(null);
    if (this.form.invalid) return;
    const username = this.form.controls.username.value?.trim();
    this.saving.set(true);
    this.api.createDevice({ engineId: Number(this.form.controls.engineId.value), ...(username ? { username } : {}) }).subscribe({
      next: (d) => this.ref.close(d),
      error: (err) => {
        this.saving.set(false);
        this.formError.set(applyServerError(this.form, err));
      },
    });
  }
}
