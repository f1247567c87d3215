import { ChangeDetectionStrategy, Component, computed, effect, inject, input, output, signal, untracked } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { exhaustMap, interval, materialize, startWith } from 'rxjs';
import { ClockService } from '../core/clock.service';
import { UnitValuePipe } from '../ui/unit-value.pipe';
import { CooldownChart } from './cooldown-chart';
import { WorkApi, errorText } from './work-api';
import { CONDITION_TEXT, formatDateTime } from './work-labels';
import { OpeningCheck, OpeningCondition } from './work-types';

const POLL_MS = 5000;

/**
 * The live opening check of one engine, polled every 5 s from the server (which computes it with the
 * shared function). Each condition shows an icon and words, not colour alone. Only the face of the
 * lock: the server checks again when a step is completed.
 */
@Component({
  selector: 'jw-opening-check-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule, UnitValuePipe, CooldownChart],
  template: `
    <section class="panel" [class.clear]="check()?.clear" [class.stale]="check()?.stale" aria-live="polite" aria-label="Opening check">
      @if (check(); as c) {
        <div class="verdict">
          <mat-icon [fontIcon]="c.clear ? 'lock_open' : 'lock'" aria-hidden="true" />
          <div>
            <div class="word">{{ c.clear ? 'Clear: the cooling system may be opened' : 'Not clear: keep the cooling system closed' }}</div>
            <div class="sub">
              @if (c.stale) {
                Live data is missing or stale.
              } @else if (!c.clear && c.clearAt) {
                Forecast: clear in about {{ minutesUntil(c.clearAt) }} min ({{ when(c.clearAt) }}).
                @if (c.forecast?.ambientFitted) {
                  Could be from {{ when(c.forecast!.earliest) }} to {{ c.forecast!.latest === null ? 'later than can be said' : when(c.forecast!.latest) }}: the
                  surroundings' temperature is estimated, not measured.
                }
                A forecast only: the lock opens when the check is clear.
              } @else if (!c.clear) {
                No forecast yet.
              }
              Checked {{ when(c.at) }}.
            </div>
          </div>
        </div>
        <div class="live">
          <div>
            <span class="label">Coolant</span> <span class="jw-num big">{{ tempValue() | unitValue: 'coolant_temp' }}</span>
            <span class="lim">limit {{ c.settings.safeOpenTempC | unitValue: 'coolant_temp' }}</span>
          </div>
          <div>
            <span class="label">Pressure</span> <span class="jw-num big">{{ pressureValue() | unitValue: 'coolant_pressure' }}</span>
            <span class="lim">limit {{ c.settings.maxPressureKpa | unitValue: 'coolant_pressure' }}</span>
          </div>
        </div>
        <ul class="conditions">
          @for (k of shown(); track k.name) {
            <li [class.met]="k.met">
              <mat-icon [fontIcon]="k.met ? 'check_circle' : 'cancel'" aria-hidden="true" />
              <span class="state">{{ k.met ? 'Met' : 'Not met' }}</span>
              <span>{{ label(k) }}</span>
              <span class="val jw-num">{{ valueText(k) }}</span>
            </li>
          }
        </ul>
        @if (heaterBlocks(); as h) {
          <p class="heater" role="alert">
            <mat-icon fontIcon="block" aria-hidden="true" />
            <span
              >The jacket-water heater is set to {{ h.setpointC | unitValue: 'coolant_temp' }}, at or above the safe opening temperature
              {{ h.limitC | unitValue: 'coolant_temp' }}: this check can never clear while the heater is on. Switch the heater off and lock it out, then the
              coolant can cool below the limit.</span
            >
          </p>
        }
        @if (!c.clear && c.reasons.length) {
          <div class="why">
            <span class="label">Why not clear:</span>
            <ul class="reasons">
              @for (r of c.reasons; track $index) {
                <li>{{ r }}</li>
              }
            </ul>
          </div>
        }
        @if (!c.clear && stopTs(); as stop) {
          @defer (on immediate) {
            <jw-cooldown-chart [engineId]="engineId()" [check]="c" [stopTs]="stop" />
          } @placeholder {
            <p class="chart-wait">Cool-down chart…</p>
          }
        } @else if (!c.clear && !c.stale) {
          <p class="chart-wait">The cool-down chart starts when the engine has stopped.</p>
        }
      } @else if (error(); as e) {
        <div class="verdict">
          <mat-icon fontIcon="help" aria-hidden="true" />
          <div class="word">Opening check unavailable: {{ e }}</div>
        </div>
      } @else {
        <div class="verdict">
          <mat-icon fontIcon="hourglass_empty" aria-hidden="true" />
          <div class="word">Checking…</div>
        </div>
      }
    </section>
  `,
  styles: `
    .panel {
      border: 2px solid var(--jw-warning);
      background: var(--jw-warning-bg);
      border-radius: 8px;
      padding: 12px 16px;
    }
    .panel.clear {
      border-color: var(--mat-sys-outline);
      background: var(--mat-sys-surface-container);
    }
    .panel.stale {
      border-color: var(--jw-stale);
      background: var(--jw-stale-bg);
    }
    .verdict {
      display: flex;
      gap: 12px;
      align-items: center;
    }
    .verdict mat-icon {
      font-size: 40px;
      width: 40px;
      height: 40px;
    }
    .word {
      font: var(--mat-sys-title-medium);
      font-weight: 700;
    }
    .sub {
      color: var(--jw-muted-text);
    }
    .live {
      display: flex;
      gap: 32px;
      flex-wrap: wrap;
      margin: 10px 0;
    }
    .label {
      color: var(--jw-muted-text);
      margin-right: 6px;
    }
    .lim {
      margin-left: 6px;
    }
    .big {
      font: var(--mat-sys-headline-small);
      font-weight: 600;
    }
    .lim {
      color: var(--jw-muted-text);
      font: var(--mat-sys-body-small);
    }
    .conditions {
      list-style: none;
      padding: 0;
      margin: 0;
      display: grid;
      gap: 4px;
    }
    .conditions li {
      display: grid;
      grid-template-columns: 24px 5.5em 1fr auto;
      gap: 8px;
      align-items: center;
      font-weight: 600;
    }
    .conditions li.met {
      font-weight: 400;
    }
    .val {
      color: var(--jw-muted-text);
    }
    .why {
      margin-top: 8px;
    }
    .reasons {
      margin: 2px 0 0;
      padding-left: 20px;
    }
    .heater {
      display: flex;
      gap: 8px;
      align-items: flex-start;
      margin: 10px 0 0;
      padding: 8px 10px;
      border: 2px solid var(--jw-alarm-high);
      background: var(--jw-alarm-high-bg);
      border-radius: 6px;
      font-weight: 700;
    }
    .chart-wait {
      color: var(--jw-muted-text);
      margin: 8px 0 0;
    }
  `,
})
export class OpeningCheckPanel {
  private readonly api = inject(WorkApi);
  private readonly clock = inject(ClockService);
  readonly engineId = input.required<number>();
  /** Whether to count the technician's lockout confirmation in (it is always re-checked by the server). */
  readonly lockoutConfirmed = input(false);
  /** Every fresh result, for the steps that show their lock. */
  readonly changed = output<OpeningCheck>();

  protected readonly check = signal<OpeningCheck | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly shown = computed(() => this.check()?.conditions ?? []);
  protected readonly tempValue = computed(() => num(this.check()?.conditions.find((c) => c.name === 'coolant-temperature')?.value));
  protected readonly pressureValue = computed(() => num(this.check()?.conditions.find((c) => c.name === 'coolant-pressure')?.value));
  /** ms the engine stopped, from the stopped-for seconds at the time of the check; null while running or unknown. */
  protected readonly stopTs = computed(() => {
    const c = this.check();
    const k = c?.conditions.find((x) => x.name === 'engine-stopped');
    if (!c || !k || typeof k.value !== 'number' || k.value <= 0 || k.detail === 'no data' || k.detail?.startsWith('running')) return null;
    return Date.parse(c.at) - k.value * 1000;
  });
  /** The heater holds the coolant at or above the limit: the check cannot clear until it is switched off. */
  protected readonly heaterBlocks = computed(() => {
    const c = this.check();
    const h = c?.settings.heaterSetpointC;
    if (!c || c.clear || h === null || h === undefined || h < c.settings.safeOpenTempC) return null;
    return { setpointC: h, limitC: c.settings.safeOpenTempC };
  });

  constructor() {
    // one poll per engine and lock-out answer; a slow answer is waited for rather than overlapped
    effect((onCleanup) => {
      const id = this.engineId();
      const lockout = this.lockoutConfirmed();
      const polls = interval(POLL_MS).pipe(startWith(-1));
      const sub = untracked(() =>
        polls.pipe(exhaustMap(() => this.api.openingCheck(id, lockout).pipe(materialize()))).subscribe((n) => {
          if (n.kind === 'N') {
            this.check.set(n.value);
            this.error.set(null);
            this.changed.emit(n.value);
          } else if (n.kind === 'E') this.error.set(errorText(n.error));
        }),
      );
      onCleanup(() => sub.unsubscribe());
    });
  }

  protected label(c: OpeningCondition): string {
    return CONDITION_TEXT[c.name] ?? c.name;
  }

  protected valueText(c: OpeningCondition): string {
    const s = this.check()?.settings;
    // "1.4 min, needs 0.5 min" reads right whether the time is short of the limit or past it
    if (c.name === 'engine-stopped') return c.detail === 'no data' ? 'no data' : `${duration(c.value)}, needs ${duration(c.limit)} · ${c.detail ?? ''}`;
    if (c.name === 'held') return `${duration(c.value)}, needs ${duration(c.limit)}`;
    if (c.name === 'telemetry-fresh') return c.value === null ? 'no data' : `newest ${Math.round(Number(c.value))} s old (max ${s?.staleAfterS ?? c.limit} s)`;
    if (c.name === 'lockout-confirmed') return c.met ? 'confirmed on the lock-out step' : 'do the lock-out step first';
    return '';
  }

  protected when(t: string | number): string {
    return formatDateTime(t);
  }

  protected minutesUntil(t: number): number {
    return Math.max(0, Math.ceil((t - this.clock.now()) / 60000));
  }
}

const num = (v: unknown): number | null => (typeof v === 'number' ? v : null);
/** Seconds as the panel writes every duration: minutes (one decimal) up to two hours, then hours, then days. */
export function duration(v: unknown): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) return '—';
  if (v < 2 * 3600) return `${(v / 60).toFixed(1)} min`;
  if (v < 48 * 3600) return `${(v / 3600).toFixed(1)} h`;
  return `${(v / 86400).toFixed(1)} d`;
}
