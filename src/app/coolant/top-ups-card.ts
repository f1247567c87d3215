import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { catchError, of, switchMap } from 'rxjs';
import { gallonsToLitres } from '../../../shared/units';
import { PreferencesService } from '../core/preferences.service';
import { aboveZeroText, decimalText } from '../ui/form-value';
import { JwQuantitiesPipe } from '../ui/quantity-text';
import { JwTimePipe } from '../ui/time-format';
import { formatStored } from '../ui/unit-format';
import { parseNumber } from './additive-form';
import { CoolantService } from './coolant.service';
import { TopUpLiquid, TopUpsAnswer } from './coolant-types';

const LIQUID: Record<TopUpLiquid, string> = { water: 'Water', premix: 'Premix', glycol: 'Glycol' };

/** Coolant added between tests, and the additive and glycol estimated from them since the last test. */
@Component({
  selector: 'jw-top-ups-card',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    JwTimePipe,
    JwQuantitiesPipe,
    ReactiveFormsModule,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
  ],
  template: `
    <mat-card appearance="outlined">
      <mat-card-header><mat-card-title>Coolant added (top-ups)</mat-card-title></mat-card-header>
      <mat-card-content>
        @if (answer().estimate; as e) {
          <section class="estimate" [class.abnormal]="e.belowLow" aria-label="Estimate since the last test" data-test="top-up-estimate">
            <p class="head">
              <mat-icon aria-hidden="true" [fontIcon]="e.belowLow ? 'science' : 'calculate'" />
              <strong
                >{{ e.belowLow ? 'Additive probably low: test now' : 'Estimate since the test of '
                }}{{ e.belowLow ? '' : (e.basedOnTestAt | jwTime: zone() : 'datetime') }}</strong
              >
            </p>
            <ul>
              @for (r of e.reasons; track $index) {
                <li>{{ r | jwQuantities }}</li>
              }
            </ul>
            <p class="why">Mass balance: each top-up replaces coolant that was lost with its additive; the added liquid brings none.</p>
          </section>
        } @else {
          <p class="why">No test with an additive or glycol reading yet: no estimate.</p>
        }
        @if (canRecord()) {
          <form class="form" [formGroup]="form" (ngSubmit)="save()">
            <mat-form-field hideRequiredMarker
              ><mat-label>Volume added</mat-label><input matInput inputmode="decimal" formControlName="volume" /><span matTextSuffix>{{
                volumeUnit() === 'gal' ? 'US gal' : 'L'
              }}</span></mat-form-field
            >
            <mat-form-field>
              <mat-label>What was added</mat-label>
              <mat-select formControlName="liquid">
                <mat-option value="water">Water</mat-option>
                <mat-option value="premix">Premix</mat-option>
                <mat-option value="glycol">Glycol (concentrate)</mat-option>
              </mat-select>
            </mat-form-field>
            @if (liquid() === 'premix') {
              <mat-form-field hideRequiredMarker
                ><mat-label>Premix glycol</mat-label><input matInput inputmode="decimal" formControlName="premix" /><span matTextSuffix
                  >% by volume</span
                ></mat-form-field
              >
            }
            <mat-form-field class="wide"
              ><mat-label>Notes</mat-label><input matInput name="topUpNotes" maxlength="500" formControlName="notes"
            /></mat-form-field>
            @if (error()) {
              <p class="error" role="alert">{{ error() }}</p>
            }
            <button mat-stroked-button type="submit" [disabled]="saving()">Record top-up</button>
          </form>
        }
        @if (answer().topUps.length) {
          <ul class="list" aria-label="Recent top-ups">
            @for (t of answer().topUps.slice(0, 10); track t.id) {
              <li>
                {{ t.addedAt | jwTime: zone() : 'datetime' }}: {{ vol(t.volumeL) }} {{ liquidText(t.liquid)
                }}{{ t.liquid === 'premix' ? ' ' + t.premixPercent + ' %' : '' }}{{ t.notes ? ' · ' + t.notes : '' }}
              </li>
            }
          </ul>
        }
      </mat-card-content>
    </mat-card>
  `,
  styles: `
    .estimate {
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      padding: 4px 12px;
      margin-bottom: 8px;
    }
    .estimate.abnormal {
      border-color: var(--jw-warning);
      background: var(--jw-warning-bg);
    }
    .head {
      display: flex;
      gap: 8px;
      align-items: center;
      margin: 4px 0;
    }
    .abnormal .head {
      color: var(--jw-warning);
    }
    .why {
      color: var(--jw-muted-text);
      font-size: 0.85rem;
    }
    .form {
      display: flex;
      flex-wrap: wrap;
      gap: 0 8px;
      align-items: baseline;
    }
    .form mat-form-field {
      width: 220px;
    }
    .form [matTextSuffix] {
      white-space: nowrap;
    }
    .form mat-form-field.wide {
      width: 100%;
    }
    .error {
      color: var(--jw-alarm-high);
      width: 100%;
    }
    .list {
      font-size: 0.9rem;
      padding-left: 18px;
    }
  `,
})
export class TopUpsCard {
  private readonly api = inject(CoolantService);
  private readonly prefs = inject(PreferencesService);
  readonly engineId = input.required<number>();
  readonly canRecord = input(false);
  /** The engine's site zone (the page's display zone); times are written as everywhere else. */
  readonly zone = input<string | null>(null);
  /** Bumped by the page when a test is saved (the estimate starts from the latest test). */
  readonly refresh = input(0);

  protected readonly volumeUnit = this.prefs.volumeUnit;
  private readonly reload = signal(0);
  protected readonly answer = toSignal(
    toObservable(computed(() => ({ id: this.engineId(), a: this.refresh(), b: this.reload() }))).pipe(
      switchMap(({ id }) => this.api.topUps(id).pipe(catchError(() => of({ topUps: [], estimate: null } as TopUpsAnswer)))),
    ),
    { initialValue: { topUps: [], estimate: null } as TopUpsAnswer },
  );

  /** A top-up as typed: the volume in the user's unit, the premix share only for premix. */
  readonly form = inject(NonNullableFormBuilder).group({
    volume: ['', [Validators.required, aboveZeroText]],
    liquid: ['premix' as TopUpLiquid],
    premix: ['50', [Validators.required, decimalText]],
    notes: ['', Validators.maxLength(500)],
  });
  protected readonly liquid = toSignal(this.form.controls.liquid.valueChanges, { initialValue: this.form.controls.liquid.value });
  protected readonly saving = signal(false);
  protected readonly error = signal<string | null>(null);

  protected readonly vol = (l: number) => formatStored(l, 'volume', this.prefs.preferences(), 1);
  protected liquidText(l: TopUpLiquid): string {
    return LIQUID[l].toLowerCase();
  }

  protected save(): void {
    const c = this.form.controls;
    if (c.volume.invalid) {
      this.error.set('volumeL: type the volume added (a number above 0).');
      return;
    }
    const liquid = c.liquid.value;
    if (liquid === 'premix' && c.premix.invalid) {
      this.error.set('premixPercent: type the glycol share of the premix.');
      return;
    }
    const v = parseNumber(c.volume.value)!;
    const premix = liquid === 'premix' ? parseNumber(c.premix.value) : null;
    const volumeL = this.volumeUnit() === 'gal' ? gallonsToLitres(v) : v;
    this.saving.set(true);
    this.error.set(null);
    this.api.recordTopUp(this.engineId(), { volumeL, liquid, premixPercent: premix, notes: c.notes.value.trim() || null }).subscribe({
      next: () => {
        this.saving.set(false);
        this.form.patchValue({ volume: '', notes: '' });
        this.form.markAsUntouched();
        this.reload.update((n) => n + 1);
      },
      error: (e: unknown) => {
        this.saving.set(false);
        this.error.set(e instanceof HttpErrorResponse ? (e.error?.error ?? `${e.status} ${e.statusText}`) : String(e));
      },
    });
  }
}
