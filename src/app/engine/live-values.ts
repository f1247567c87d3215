import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { CHANNELS, ChannelKey } from '../../../shared/channels';
import { DISPLAY_SCALES, NormalBand, bandPosition, normalBand } from '../../../shared/normal-bands';
import { ClockService } from '../core/clock.service';
import { ReadingCadence, isStale, staleText } from '../core/staleness';
import { Engine, RunState } from '../fleet/fleet-types';
import { toMillis } from '../fleet/run-state';
import { BandIndicator } from '../ui/band-indicator';
import { UnitValuePipe } from '../ui/unit-value.pipe';

/** Scales for the channels that have no normal band, so their bar still places the value. */
const EXTRA_SCALES: Partial<Record<ChannelKey, NormalBand>> = { engine_speed: { low: 0, high: 2000 }, ambient_temp: { low: -30, high: 50 } };
const ORDER: ChannelKey[] = ['coolant_temp', 'coolant_pressure', 'coolant_conductivity', 'engine_speed', 'ambient_temp'];
const POSITION_TEXT = { low: 'Below normal', high: 'Above normal', normal: 'Within normal' } as const;

interface Row {
  key: ChannelKey;
  label: string;
  value: number | null;
  bad: boolean;
  at: number | null;
  stale: boolean;
  band: NormalBand | null;
  scale: NormalBand;
  judged: string;
  abnormal: boolean;
}

/** The engine's latest value of each channel, with its unit and its place against the normal band. */
@Component({
  selector: 'jw-live-values',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [BandIndicator, UnitValuePipe],
  template: `
    <dl class="rows">
      @for (r of rows(); track r.key) {
        <div class="row" [class.stale]="r.stale" [attr.data-stale]="r.stale ? 'true' : null">
          <dt>{{ r.label }}</dt>
          <dd class="value jw-num">
            @if (r.bad) {
              <span class="bad">bad reading</span>
            } @else {
              {{ r.value | unitValue: r.key }}
            }
          </dd>
          <dd class="bar"><jw-band-indicator [value]="r.value" [band]="r.band" [scale]="r.scale" [quantity]="r.key" [label]="r.label" /></dd>
          <dd class="judged" [class.abnormal]="r.abnormal">{{ r.judged }}</dd>
        </div>
      }
    </dl>
  `,
  styles: `
    .rows {
      margin: 0;
      display: grid;
      gap: 6px;
    }
    .row {
      display: grid;
      grid-template-columns: minmax(150px, 1.2fr) minmax(90px, 0.8fr) minmax(100px, 1.5fr) minmax(110px, 1fr);
      align-items: center;
      gap: 12px;
    }
    dt {
      color: var(--jw-muted-text);
    }
    dd {
      margin: 0;
    }
    .value {
      font-size: 20px;
      font-weight: 500;
      text-align: right;
    }
    .bad {
      font-size: 14px;
      color: var(--jw-warning);
      font-weight: 700;
    }
    .judged {
      font-size: 13px;
      color: var(--jw-muted-text);
    }
    .judged.abnormal {
      color: var(--jw-warning);
      font-weight: 700;
    }
    .stale .value {
      color: var(--jw-stale);
      font-style: italic;
    }
    .stale {
      opacity: 0.65;
    }
    .stale .judged {
      color: var(--jw-stale);
    }
    @media (max-width: 599.98px) {
      .row {
        grid-template-columns: 1fr auto;
      }
      .bar,
      .judged {
        grid-column: 1 / -1;
      }
    }
  `,
})
export class LiveValues {
  readonly engine = input.required<Engine>();
  readonly state = input.required<RunState>();
  /** The zone times are written in (the site's, or the browser's by preference). */
  readonly zone = input<string | null>(null);

  private readonly clock = inject(ClockService);
  private readonly cadence = inject(ReadingCadence);

  protected readonly rows = computed<Row[]>(() => {
    const e = this.engine();
    const state = this.state();
    const now = this.clock.now();
    const interval = this.cadence.intervalFor(e.id);
    return ORDER.map((key) => {
      const latest = e.latest?.[key];
      const bad = !!latest && latest.quality !== 0;
      const value = latest && !bad ? latest.value : null;
      const at = toMillis(latest?.ts);
      const stale = !!latest && isStale(at, now, interval);
      const band = normalBand(key, state, e);
      const pos = value !== null && band ? bandPosition(value, band) : null;
      const judged = bad ? 'Sensor value refused' : value === null ? 'No value' : pos ? POSITION_TEXT[pos] : 'Not judged in this state';
      return {
        key,
        label: CHANNELS[key].label,
        value,
        bad,
        at,
        stale,
        band,
        scale: DISPLAY_SCALES[key] ?? EXTRA_SCALES[key] ?? { low: 0, high: 100 },
        // A stale value is never judged as if it were current: it says how old it is instead.
        judged: stale && at !== null ? `Not current: ${staleText(at, now, this.zone())}` : judged,
        abnormal: bad || (!stale && (pos === 'low' || pos === 'high')),
      };
    });
  });
}
