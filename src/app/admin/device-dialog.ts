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
import { SPARKPLUG_ID_PATTERN } from '../../../shared/sparkplug/topic';

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
            @for (e of engines; track e.id) {
              <mat-option [value]="e.id">{{ e.name }}</mat-option>
            }
          </mat-select>
          <mat-error>{{ err('engineId') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>User name (optional)</mat-label>
          <input matInput formControlName="username" autocomplete="off" />
          <mat-hint>3–64 letters, digits, dot, dash or underscore. Left empty, one is made up.</mat-hint>
          <mat-error>{{ err('username') }}</mat-error>
        </mat-form-field>
        <h3 class="sub">Sparkplug B gateway (optional)</h3>
        <p class="hint">
          For a gateway that publishes Sparkplug B: the group and edge node it uses, and the device id when this engine is a device under that edge node. Leave
          empty for our JSON topics.
        </p>
        <mat-form-field>
          <mat-label>Group id</mat-label>
          <input matInput formControlName="groupId" autocomplete="off" />
          <mat-error>{{ spErr('groupId') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Edge node id</mat-label>
          <input matInput formControlName="edgeNodeId" autocomplete="off" />
          <mat-error>{{ spErr('edgeNodeId') }}</mat-error>
        </mat-form-field>
        <mat-form-field>
          <mat-label>Device id (optional)</mat-label>
          <input matInput formControlName="deviceId" autocomplete="off" />
          <mat-hint>Empty: the edge node itself reports this engine.</mat-hint>
          <mat-error>{{ spErr('deviceId') }}</mat-error>
        </mat-form-field>
        @if (formError(); as e) {
          <p class="form-error" role="alert">{{ e }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">Add device</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .fields {
      display: flex;
      flex-direction: column;
      min-width: min(420px, 80vw);
    }
    .form-error {
      color: var(--jw-alarm-high);
    }
    .sub {
      font: var(--mat-sys-title-small);
      margin: 8px 0 0;
    }
    .hint {
      color: var(--jw-muted-text);
      margin: 0 0 8px;
    }
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
    groupId: ['', Validators.pattern(SPARKPLUG_ID_PATTERN)],
    edgeNodeId: ['', Validators.pattern(SPARKPLUG_ID_PATTERN)],
    deviceId: ['', Validators.pattern(SPARKPLUG_ID_PATTERN)],
  });

  protected spErr(name: 'groupId' | 'edgeNodeId' | 'deviceId'): string {
    const c = this.form.controls[name];
    if (c.hasError('pattern')) return '1–64 letters, digits, dot, colon, dash or underscore.';
    return c.hasError('required') ? 'Needed for a Sparkplug gateway.' : errorText(c);
  }

  protected err(name: 'engineId' | 'username'): string {
    const c = this.form.controls[name];
    return c.hasError('pattern') ? '3–64 letters, digits, dot, dash or underscore.' : errorText(c);
  }

  protected save(): void {
    const c = this.form.controls;
    const [groupId, edgeNodeId, deviceId] = [c.groupId.value?.trim() ?? '', c.edgeNodeId.value?.trim() ?? '', c.deviceId.value?.trim() ?? ''];
    // a Sparkplug identity needs its group and edge node together
    const sparkplug = !!(groupId || edgeNodeId || deviceId);
    for (const ctl of [c.groupId, c.edgeNodeId]) {
      ctl.setValidators(sparkplug ? [Validators.required, Validators.pattern(SPARKPLUG_ID_PATTERN)] : Validators.pattern(SPARKPLUG_ID_PATTERN));
      ctl.updateValueAndValidity();
    }
    this.form.markAllAsTouched();
    this.formError.set(null);
    if (this.form.invalid) return;
    const username = c.username.value?.trim();
    this.saving.set(true);
    this.api
      .createDevice({
        engineId: Number(c.engineId.value),
        ...(username ? { username } : {}),
        ...(sparkplug ? { sparkplug: { groupId, edgeNodeId, ...(deviceId ? { deviceId } : {}) } } : {}),
      })
      .subscribe({
        next: (d) => this.ref.close(d),
        error: (err) => {
          this.saving.set(false);
          this.formError.set(applyServerError(this.form, err));
        },
      });
  }
}
