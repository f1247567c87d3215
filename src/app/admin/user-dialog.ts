import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { toSignal } from '@angular/core/rxjs-interop';
import { switchMap } from 'rxjs';
import { Role } from '../core/user';
import { AdminService } from './admin.service';
import { AdminUser, ROLES, Site } from './admin-types';
import { applyServerError, errorText } from './form-errors';

/** 'add' a user, 'edit' name/e-mail/role, or set a new 'password'. */
export interface UserDialogData {
  mode: 'add' | 'edit' | 'password';
  user: AdminUser | null;
}

const PASSWORD_ALPHABET = 'abcdefghijkmnpqrstuvwxyzABCDEFGHJKLMNPQRSTUVWXYZ23456789';

/** A random first password of 16 characters, for the admin to pass on; the user changes it later. */
export function generatePassword(length = 16): string {
  const bytes = new Uint32Array(length);
  crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => PASSWORD_ALPHABET[b % PASSWORD_ALPHABET.length]).join('');
}

@Component({
  selector: 'jw-user-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>{{ title }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content class="fields">
        @if (data.mode !== 'password') {
          <mat-form-field>
            <mat-label>Name</mat-label>
            <input matInput formControlName="name" required />
            <mat-error>{{ err('name') }}</mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>E-mail</mat-label>
            <input matInput type="email" formControlName="email" required autocomplete="off" />
            <mat-error>{{ err('email') }}</mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Role</mat-label>
            <mat-select formControlName="role">
              @for (r of roles; track r.value) {
                <mat-option [value]="r.value">{{ r.label }}</mat-option>
              }
            </mat-select>
            <mat-error>{{ err('role') }}</mat-error>
          </mat-form-field>
          <mat-form-field>
            <mat-label>Sites this user sees</mat-label>
            <mat-select formControlName="siteIds" multiple placeholder="Every site">
              @for (s of sites(); track s.id) {
                <mat-option [value]="s.id">{{ s.name }}</mat-option>
              }
            </mat-select>
            <mat-hint>{{
              form.controls.role.value === 'admin'
                ? 'Administrators see every site whatever is chosen.'
                : 'None chosen: every site. Otherwise only these sites.'
            }}</mat-hint>
          </mat-form-field>
        }
        @if (data.mode !== 'edit') {
          <mat-form-field>
            <mat-label>{{ data.mode === 'add' ? 'First password' : 'New password' }}</mat-label>
            <input matInput formControlName="password" required autocomplete="new-password" />
            <button mat-icon-button matSuffix type="button" (click)="newPassword()" aria-label="Make up a password"><mat-icon fontIcon="casino" /></button>
            <mat-hint>At least 10 characters. Give it to the user by a safe way; they should change it.</mat-hint>
            <mat-error>{{ err('password') }}</mat-error>
          </mat-form-field>
        }
        @if (formError(); as e) {
          <p class="form-error" role="alert">{{ e }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="saving()">{{ action }}</button>
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
  `,
})
export class UserDialog {
  protected readonly data = inject<UserDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<UserDialog, AdminUser>>(MatDialogRef);
  private readonly api = inject(AdminService);
  protected readonly roles = ROLES;
  protected readonly saving = signal(false);
  protected readonly formError = signal<string | null>(null);
  protected readonly sites = toSignal(this.api.sites(), { initialValue: [] as Site[] });

  protected readonly title =
    this.data.mode === 'add' ? 'Add a user' : this.data.mode === 'edit' ? `Change ${this.data.user?.name}` : `New password for ${this.data.user?.name}`;
  protected readonly action = this.data.mode === 'add' ? 'Add user' : this.data.mode === 'edit' ? 'Save changes' : 'Set password';

  protected readonly form = inject(FormBuilder).nonNullable.group({
    name: [this.data.user?.name ?? '', [Validators.required, Validators.maxLength(120), Validators.pattern(/\S/)]],
    email: [this.data.user?.email ?? '', [Validators.required, Validators.email, Validators.maxLength(254)]],
    role: [this.data.user?.role ?? ('operator' as Role), Validators.required],
    siteIds: [this.data.user?.siteIds ?? ([] as number[])],
    password: [
      this.data.mode === 'edit' ? '' : generatePassword(),
      this.data.mode === 'edit' ? [] : [Validators.required, Validators.minLength(12), Validators.maxLength(72)],
    ],
  });

  protected err(name: keyof typeof this.form.controls): string {
    return errorText(this.form.controls[name]);
  }

  protected newPassword(): void {
    this.form.controls.password.setValue(generatePassword());
  }

  protected save(): void {
    this.form.markAllAsTouched();
    this.formError.set(null);
    if (this.form.invalid) return;
    const v = this.form.getRawValue();
    const user = this.data.user;
    const call =
      this.data.mode === 'add'
        ? this.api.createUser({ name: v.name.trim(), email: v.email.trim(), role: v.role, password: v.password })
        : this.data.mode === 'edit'
          ? this.api.updateUser(user!.id, { name: v.name.trim(), email: v.email.trim(), role: v.role })
          : this.api.updateUser(user!.id, { password: v.password });
    // sites are their own call; only when they changed
    const before = [...(user?.siteIds ?? [])].sort((a, b) => a - b).join(',');
    const after = [...v.siteIds].sort((a, b) => a - b).join(',');
    const withSites = this.data.mode === 'password' || before === after ? call : call.pipe(switchMap((u) => this.api.setUserSites(u.id, v.siteIds)));
    this.saving.set(true);
    withSites.subscribe({
      next: (u) => this.ref.close(u),
      error: (err) => {
        this.saving.set(false);
        this.formError.set(applyServerError(this.form, err));
      },
    });
  }
}
