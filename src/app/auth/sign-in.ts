import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { ActivatedRoute, Router } from '@angular/router';
import { AuthService, SignInError } from '../core/auth.service';
import type { Role } from '../core/user';

/** E-mail and password; errors say what went wrong and what to do. */
@Component({
  selector: 'jw-sign-in',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatCardModule, MatFormFieldModule, MatIconModule, MatInputModule, MatProgressBarModule],
  template: `
    <main class="page">
      <mat-card appearance="outlined" class="card">
        <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
          <h1><span class="material-icons mark" aria-hidden="true">water_drop</span>Jacketwatch</h1>
          <p class="lead">Sign in to watch your engines' cooling systems.</p>

          @if (auth.notice(); as notice) {
            <p class="notice" role="status"><mat-icon aria-hidden="true" fontIcon="info" />{{ notice }}</p>
          }

          <mat-form-field appearance="outline">
            <mat-label>E-mail</mat-label>
            <input matInput formControlName="email" type="email" autocomplete="username" required />
            @if (form.controls.email.hasError('required')) {
              <mat-error>Enter your e-mail address.</mat-error>
            } @else if (form.controls.email.hasError('email')) {
              <mat-error>This is not an e-mail address.</mat-error>
            }
          </mat-form-field>

          <mat-form-field appearance="outline">
            <mat-label>Password</mat-label>
            <input matInput formControlName="password" [type]="showPassword() ? 'text' : 'password'" autocomplete="current-password" required />
            <button
              mat-icon-button
              matSuffix
              type="button"
              (click)="showPassword.set(!showPassword())"
              [attr.aria-label]="showPassword() ? 'Hide password' : 'Show password'"
              [attr.aria-pressed]="showPassword()"
            >
              <mat-icon [fontIcon]="showPassword() ? 'visibility_off' : 'visibility'" />
            </button>
            @if (form.controls.password.hasError('required')) {
              <mat-error>Enter your password.</mat-error>
            }
          </mat-form-field>

          @if (failure(); as f) {
            <p class="failure" role="alert"><mat-icon aria-hidden="true" fontIcon="error_outline" />{{ f }}</p>
          }

          <button mat-flat-button type="submit" class="submit" [disabled]="busy()">Sign in</button>
          @if (busy()) {
            <mat-progress-bar mode="indeterminate" aria-label="Signing in" />
          }
        </form>
      </mat-card>
    </main>
  `,
  styles: `
    .page {
      min-height: 100vh;
      display: grid;
      place-items: center;
      padding: 16px;
      box-sizing: border-box;
    }
    .card {
      width: min(400px, 100%);
      padding: 24px;
      box-sizing: border-box;
    }
    form {
      display: flex;
      flex-direction: column;
    }
    h1 {
      font: var(--mat-sys-headline-small);
      font-weight: 700;
      margin: 0;
      display: flex;
      align-items: center;
      gap: 8px;
    }
    .mark {
      color: var(--mat-sys-primary);
    }
    .lead {
      color: var(--jw-muted-text);
      margin: 4px 0 20px;
    }
    .notice,
    .failure {
      display: flex;
      gap: 8px;
      align-items: flex-start;
      margin: 0 0 16px;
      padding: 8px 10px;
      border-radius: 6px;
    }
    .notice mat-icon,
    .failure mat-icon {
      flex: none;
    }
    .notice {
      background: var(--mat-sys-surface-container-high);
    }
    .failure {
      color: var(--jw-alarm-high);
      background: var(--jw-alarm-high-bg);
    }
    .submit {
      margin-top: 8px;
      height: 44px;
    }
    mat-progress-bar {
      margin-top: 8px;
    }
  `,
})
export class SignIn {
  protected readonly auth = inject(AuthService);
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', Validators.required],
  });
  protected readonly busy = signal(false);
  protected readonly failure = signal<string | null>(null);
  protected readonly showPassword = signal(false);

  protected async submit(): Promise<void> {
    if (this.busy()) return;
    this.form.markAllAsTouched();
    if (this.form.invalid) return;
    this.busy.set(true);
    this.failure.set(null);
    try {
      const { email, password } = this.form.getRawValue();
      const user = await this.auth.signIn(email.trim(), password);
      await this.router.navigateByUrl(safeReturnUrl(this.route.snapshot.queryParamMap.get('returnUrl'), user.role));
    } catch (err) {
      this.failure.set(err instanceof SignInError ? err.message : 'Sign-in failed. Try again.');
    } finally {
      this.busy.set(false);
    }
  }
}

/** Only our own paths: a return address never leads off the site. Without one, each role starts at its day's work. */
function safeReturnUrl(url: string | null, role: Role): string {
  if (url && url.startsWith('/') && !url.startsWith('//') && !url.startsWith('/sign-in')) return url;
  return role === 'technician' ? '/work/mine' : '/fleet';
}
