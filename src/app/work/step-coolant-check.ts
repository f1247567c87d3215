import { finalize } from 'rxjs';
import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { CoolantInputError, decideAdditive, type AdditiveDecision } from '../../../shared/coolant';
import { AdditiveDecisionView } from '../coolant/additive-decision';
import { ChemistryFindings } from '../coolant/chemistry-findings';
import { AdditiveProfile } from '../coolant/coolant-types';
import { CoolantService } from '../coolant/coolant.service';
import { EngineFacts, errorText, WorkApi } from './work-api';
import { OrderCoolantTest, WorkOrderDetail } from './work-types';

/**
 * Inside a coolant-test work order: the additive decision and dose for THIS engine from the readings
 * entered in the steps (decideAdditive from shared/, the same rule the server stores with a test), and
 * a button that records them as a coolant test so the coolant history and the due list see it: once per
 * order, after the sampling step is done (the server enforces both; a correction is an amendment).
 */
@Component({
  selector: 'jw-step-coolant-check',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink, AdditiveDecisionView, ChemistryFindings],
  template: `
    <section class="check" aria-labelledby="coolant-check-h">
      <h3 id="coolant-check-h"><mat-icon fontIcon="science" aria-hidden="true" />Additive decision for {{ engine()?.name ?? 'this engine' }}</h3>
      @if (scaUnitsPerGal() === null) {
        <p class="hint">
          Enter the additive (SCA) level in its step to see the decision and the dose for this engine's {{ engine()?.capacityL ?? '…' }} L cooling system.
        </p>
      } @else if (inputError(); as err) {
        <p class="hint" role="alert">{{ err }}</p>
      } @else {
        <jw-additive-decision [decision]="decision()" />
      }
      @if (shownTest(); as t) {
        <p class="ok" role="status" data-test="coolant-test-recorded">
          <mat-icon fontIcon="check_circle" aria-hidden="true" />Recorded as coolant test #{{ t.id }}; it is in the
          <a [routerLink]="['/engines', t.engineId, 'coolant']">coolant history</a> and the due list. A correction is an amendment to this record.
        </p>
        <jw-chemistry-findings [findings]="t.decision?.findings" />
      } @else if (canRecord()) {
        @if (!sampleTaken()) {
          <p class="hint"><mat-icon fontIcon="lock" aria-hidden="true" />The test can be recorded once the sampling step is done.</p>
        }
        <button mat-stroked-button type="button" (click)="record()" [disabled]="busy() || !hasReading() || !sampleTaken()" data-test="record-coolant-test">
          <mat-icon fontIcon="playlist_add_check" />Record as a coolant test
        </button>
        @if (error(); as e) {
          <p class="err" role="alert">{{ e }}</p>
        }
      }
    </section>
  `,
  styles: `
    .check {
      border-top: 1px solid var(--mat-sys-outline-variant);
      margin: 16px 0;
      padding-top: 8px;
    }
    h3 {
      display: flex;
      align-items: center;
      gap: 6px;
      font-size: 1rem;
      font-weight: 500;
      margin: 4px 0;
    }
    .hint {
      color: var(--jw-muted-text);
    }
    .ok {
      display: flex;
      align-items: center;
      gap: 6px;
    }
    .err {
      color: var(--jw-alarm-high);
    }
  `,
})
export class StepCoolantCheck {
  private readonly coolant = inject(CoolantService);

  readonly engineId = input.required<number>();
  readonly workOrderId = input.required<number>();
  /** Readings as entered in the steps (null when not entered): units/US gal, % by volume, °C. */
  readonly scaUnitsPerGal = input<number | null>(null);
  readonly glycolPercent = input<number | null>(null);
  readonly freezePointC = input<number | null>(null);
  readonly phValue = input<number | null>(null);
  readonly nitritePpm = input<number | null>(null);
  /** The technician doing the work may record. */
  readonly canRecord = input(false);
  /** The test this order already recorded, if any. */
  readonly recordedTest = input<OrderCoolantTest | null>(null);
  /** The sampling step is done. */
  readonly sampleTaken = input(false);
  /** The order after recording (or as the server has it when it was recorded before). */
  readonly orderChanged = output<WorkOrderDetail>();
  private readonly work = inject(WorkApi);

  /** What the decision needs of the engine (a new engine asks again), and the site's additive profile (none if it fails). */
  private readonly facts = rxResource({ params: () => this.engineId(), stream: ({ params: id }) => this.work.engineFacts(id) });
  private readonly profileRes = rxResource({ stream: () => this.coolant.profile() });
  protected readonly engine = computed<EngineFacts | null>(() => (this.facts.hasValue() ? (this.facts.value() ?? null) : null));
  private readonly profile = computed<AdditiveProfile | null>(() => (this.profileRes.hasValue() ? (this.profileRes.value() ?? null) : null));
  protected readonly busy = signal(false);
  private readonly recordError = signal<string | null>(null);
  protected readonly error = computed(() => {
    const err = this.facts.error();
    return err ? errorText(err) : this.recordError();
  });
  protected readonly recorded = signal<OrderCoolantTest | null>(null);
  protected readonly shownTest = computed(() => this.recordedTest() ?? this.recorded());

  private readonly outcome = computed<{ decision: AdditiveDecision | null; error: string | null }>(() => {
    const e = this.engine();
    const sca = this.scaUnitsPerGal();
    if (!e || sca === null) return { decision: null, error: null };
    const limits = this.profile()?.limits;
    try {
      return { decision: decideAdditive({ coolantFamily: e.coolantFamily, scaUnitsPerGal: sca, capacityL: e.capacityL, limits }), error: null };
    } catch (err) {
      if (err instanceof CoolantInputError) return { decision: null, error: err.message };
      throw err;
    }
  });
  protected readonly decision = computed(() => this.outcome().decision);
  protected readonly inputError = computed(() => this.outcome().error);
  protected readonly hasReading = computed(() => [this.scaUnitsPerGal(), this.glycolPercent(), this.freezePointC(), this.nitritePpm()].some((v) => v !== null));

  protected record(): void {
    this.busy.set(true);
    this.recordError.set(null);
    this.work
      .recordCoolantTest(this.workOrderId())
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({
        next: (r) => {
          this.recorded.set(r.coolantTest);
          this.orderChanged.emit(r.order);
        },
        error: (e: unknown) => {
          // recorded before (another tab or device): show that test instead of offering again
          const earlier = e instanceof HttpErrorResponse && e.status === 409 ? (e.error as { coolantTest?: OrderCoolantTest | null }).coolantTest : null;
          if (earlier) this.recorded.set(earlier);
          else this.recordError.set(errorText(e));
        },
      });
  }
}
