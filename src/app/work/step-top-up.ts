import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import { finalize } from 'rxjs';
import type { TopUpLiquid } from '../../../shared/coolant/top-up';
import { PreferencesService } from '../core/preferences.service';
import { CoolantService } from '../coolant/coolant.service';
import { errorText, WorkApi } from './work-api';
import { WorkOrderDetail, WorkStep } from './work-types';

/**
 * The top-up step of a top-up work order: how much coolant was added (in the user's volume unit) and what it was
 * (plain water, premix with its glycol share, or glycol). Marking it done records the top-up through the server's
 * top-up service; the additive and glycol estimated since the last test are shown after it, as on the coolant page.
 */
@Component({
  selector: 'jw-step-top-up',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule, RouterLink],
  template: `
    @if (!step().doneAt && canWork()) {
      <form [formGroup]="form" (ngSubmit)="record()" novalidate class="form" data-test="top-up-form">
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Volume added</mat-label>
          <input matInput type="number" inputmode="decimal" formControlName="volume" data-test="top-up-volume" />
          <span matTextSuffix>{{ volumeSymbol() }}</span>
          <mat-error>Above 0, at most the engine's system capacity.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>What was added</mat-label>
          <mat-select formControlName="liquid" data-test="top-up-liquid">
            <mat-option value="premix">Premix (glycol and water)</mat-option>
            <mat-option value="water">Plain water</mat-option>
            <mat-option value="glycol">Glycol concentrate</mat-option>
          </mat-select>
        </mat-form-field>
        @if (form.controls.liquid.value === 'premix') {
          <mat-form-field appearance="outline" subscriptSizing="dynamic">
            <mat-label>Glycol in the premix</mat-label>
            <input matInput type="number" inputmode="decimal" formControlName="premixPercent" data-test="top-up-premix" />
            <span matTextSuffix>% by volume</span>
            <mat-error>0 to 100 %.</mat-error>
          </mat-form-field>
        }
        <mat-form-field appearance="outline" subscriptSizing="dynamic" class="wide">
          <mat-label>Remark</mat-label>
          <input matInput formControlName="note" maxlength="400" />
        </mat-form-field>
        @if (form.controls.liquid.value === 'water') {
          <p class="hint"><mat-icon fontIcon="info" aria-hidden="true" />Plain water dilutes both the glycol (freeze protection) and the additive.</p>
        }
        @if (error(); as e) {
          <p class="err" role="alert">Refused by the server: {{ e }}</p>
        }
        <button mat-flat-button type="submit" class="big" [disabled]="busy() || waiting()" data-test="top-up-record">
          <mat-icon fontIcon="done" />Record top-up and mark done
        </button>
      </form>
    }
    @if (step().doneAt && estimate(); as e) {
      <section class="estimate" [class.abnormal]="e.belowLow" aria-label="Estimate after this top-up" data-test="top-up-step-estimate">
        <p class="head">
          <mat-icon aria-hidden="true" [fontIcon]="e.belowLow ? 'science' : 'calculate'" />
          <strong>{{ e.belowLow ? 'Additive probably low: test the coolant now' : 'Estimated since the last test' }}</strong>
        </p>
        <ul>
          @for (r of e.reasons; track $index) {
            <li>{{ r }}</li>
          }
        </ul>
        <p class="why">
          Mass balance: each top-up replaces coolant that was lost with its additive; the added liquid brings none.
          <a [routerLink]="['/engines', engineId(), 'coolant']">Coolant page of this engine</a>
        </p>
      </section>
    }
  `,
  styles: `
    .form {
      display: flex;
      flex-wrap: wrap;
      gap: 8px 12px;
      align-items: flex-start;
      margin-top: 8px;
    }
    .form mat-form-field {
      width: 220px;
    }
    .form mat-form-field.wide {
      flex: 1 1 100%;
      width: auto;
    }
    .hint {
      display: flex;
      align-items: center;
      gap: 6px;
      color: var(--jw-muted-text);
      margin: 0;
      flex: 1 1 100%;
    }
    .err {
      color: var(--jw-alarm-high);
      flex: 1 1 100%;
    }
    .big {
      min-height: 48px;
      font-size: 16px;
    }
    .estimate {
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      padding: 4px 12px;
      margin-top: 8px;
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
    .why {
      color: var(--jw-muted-text);
      font-size: 0.85rem;
    }
  `,
})
export class StepTopUp {
  private readonly api = inject(WorkApi);
  private readonly coolant = inject(CoolantService);
  private readonly prefs = inject(PreferencesService);

  readonly orderId = input.required<number>();
  readonly engineId = input.required<number>();
  readonly step = input.required<WorkStep>();
  /** The assigned technician is working on the order. */
  readonly canWork = input(false);
  /** The step waits for an earlier one (the cap comes off first): recording is held, the page says why. */
  readonly waiting = input(false);
  readonly orderChanged = output<WorkOrderDetail>();

  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  /** Once the step is done, the estimate after it (the server's mass balance since the last test); none if it fails. */
  private readonly topUps = rxResource({
    params: () => (this.step().doneAt ? this.engineId() : undefined),
    stream: ({ params: engineId }) => this.coolant.topUps(engineId),
  });
  protected readonly estimate = computed(() => (this.topUps.hasValue() ? (this.topUps.value()?.estimate ?? null) : null));
  protected readonly volumeSymbol = computed(() => (this.prefs.volumeUnit() === 'gal' ? 'US gal' : 'L'));

  private readonly fb = inject(FormBuilder);
  protected readonly form = this.fb.group({
    volume: this.fb.control<number | null>(null, [Validators.required, Validators.min(0.01)]),
    liquid: this.fb.nonNullable.control<TopUpLiquid>('premix'),
    premixPercent: this.fb.control<number | null>(50, [Validators.min(0), Validators.max(100)]),
    note: this.fb.nonNullable.control(''),
  });

  protected record(): void {
    this.form.markAllAsTouched();
    const v = this.form.getRawValue();
    const liquid = v.liquid;
    if (this.form.invalid || v.volume === null || (liquid === 'premix' && (v.premixPercent === null || String(v.premixPercent) === ''))) {
      if (liquid === 'premix' && (v.premixPercent === null || String(v.premixPercent) === '')) this.form.controls.premixPercent.setErrors({ required: true });
      return;
    }
    const unit = this.prefs.volumeUnit() === 'gal' ? 'gal' : 'L';
    const note = v.note.trim();
    this.busy.set(true);
    this.error.set(null);
    this.api
      .completeStep(this.orderId(), this.step().id, {
        value: Number(v.volume),
        unit,
        ...(note ? { note } : {}),
        topUp: { liquid, premixPercent: liquid === 'premix' ? Number(v.premixPercent) : null },
      })
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({ next: (order) => this.orderChanged.emit(order), error: (e: unknown) => this.error.set(errorText(e)) });
  }
}
