import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, Injector, afterNextRender, computed, inject, input, signal } from '@angular/core';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { CHANNELS, ChannelKey } from '../../../shared/channels';
import { DISPLAY_SCALES, NormalBand, bandPosition, normalBand } from '../../../shared/normal-bands';
import { AlarmStore } from '../alarms/alarm-store';
import { ClockService } from '../core/clock.service';
import { ReadingCadence, staleText } from '../core/staleness';
import { DisplayZone } from '../core/display-zone';
import { PreferencesService } from '../core/preferences.service';
import { BandIndicator } from '../ui/band-indicator';
import { formatInZone } from '../ui/time-format';
import { formatStored } from '../ui/unit-format';
import { UnitValuePipe } from '../ui/unit-value.pipe';
import { Engine, RunState } from './fleet-types';
import { TILE_CHANNELS, isEngineStale, isValueStale } from './engine-condition';
import { lastReadingAt, runStateAt } from './run-state';
import { OnScreen } from './on-screen';
import { FleetService } from './fleet.service';

const STATE_TEXT: Record<RunState, string> = { running: 'Running', stopped: 'Stopped', 'no-data': 'No data' };
const STATE_ICON: Record<RunState, string> = { running: 'sync', stopped: 'stop_circle', 'no-data': 'cloud_off' };
const DUTY_TEXT: Record<Engine['duty'], string> = { standby: 'Standby', prime: 'Prime', continuous: 'Continuous' };
/** Drawn for a moment by a tile whose engine has just left the fleet's list (its tile is being removed). */
const UNKNOWN_ENGINE = { id: 0, name: '', siteId: 0, duty: 'standby', latest: {} } as unknown as Engine;

interface TileRow {
  key: ChannelKey;
  label: string;
  short: string;
  value: number | null;
  bad: boolean;
  stale: boolean;
  band: NormalBand | null;
  scale: NormalBand;
}

/** One engine on the fleet board: state, the three coolant values against their bands, active alarms. */
@Component({
  selector: 'jw-engine-tile',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatCardModule, MatIconModule, RouterLink, BandIndicator, UnitValuePipe],
  template: `
    <!-- the link's name is the spoken summary (it starts with the engine's name); the drawn tile repeats it for the eye -->
    <a class="link" [routerLink]="['/engines', current().id]">
      <span class="jw-visually-hidden spoken">{{ summary() }}</span>
      <mat-card
        appearance="outlined"
        aria-hidden="true"
        class="tile"
        [class.no-data]="state() === 'no-data'"
        [class.stale]="stale()"
        [attr.data-stale]="stale() ? 'true' : null"
        [class.has-alarms]="alarms() > 0"
      >
        <div class="head">
          <span class="name">{{ current().name }}</span>
          <span class="duty">{{ dutyText() }}</span>
        </div>
        <div class="status">
          <span class="state" [class]="'state state-' + state()">
            <mat-icon aria-hidden="true" [fontIcon]="stateIcon()" />
            <span class="state-text">{{ stateText() }}</span>
            @if (age(); as a) {
              <span class="age" data-test="stale-age">· {{ a }}</span>
            }
          </span>
          @if (current().outOfService) {
            <span class="oos"><mat-icon aria-hidden="true" fontIcon="build" />Out of service</span>
          }
          <span class="alarms" [class.active]="alarms() > 0">
            <mat-icon aria-hidden="true" [fontIcon]="alarms() > 0 ? 'notifications_active' : 'notifications_none'" />
            <span class="jw-num">{{ alarms() }} {{ alarms() === 1 ? 'alarm' : 'alarms' }}</span>
          </span>
        </div>
        @if (current().readiness; as r) {
          <div class="readiness" [class.not-ready]="!r.ready" data-testid="readiness" [attr.data-ready]="r.ready">
            <mat-icon aria-hidden="true" [fontIcon]="r.ready ? 'check_circle' : 'report'" />
            <span class="readiness-text">{{ r.ready ? 'Ready' : 'Not ready' }}</span>
            @if (!r.ready) {
              <span class="reasons">{{ r.reasons.join('; ') }}</span>
            }
          </div>
        }
        @if (freezeShort(); as f) {
          <div class="freeze-short" data-testid="freeze-short">
            <mat-icon aria-hidden="true" fontIcon="ac_unit" />
            <span class="freeze-text">Freeze protection short:</span>
            <span class="reasons">{{ f }}</span>
          </div>
        }
        <dl class="rows">
          @for (row of rows(); track row.key) {
            <div class="row" [class.stale]="row.stale" [attr.data-stale]="row.stale ? 'true' : null">
              <dt>{{ row.short }}</dt>
              <dd class="value jw-num">
                @if (row.bad) {
                  <span class="bad">bad reading</span>
                } @else {
                  {{ row.value | unitValue: row.key }}
                }
              </dd>
              <dd class="bar">
                <jw-band-indicator [value]="row.value" [band]="row.band" [scale]="row.scale" [quantity]="row.key" [label]="row.label" />
              </dd>
            </div>
          }
        </dl>
      </mat-card>
    </a>
  `,
  styleUrl: './engine-tile.scss',
})
export class EngineTile {
  private readonly clock = inject(ClockService);
  private readonly prefs = inject(PreferencesService);
  private readonly alarmStore = inject(AlarmStore);
  private readonly zones = inject(DisplayZone);

  private readonly cadence = inject(ReadingCadence);

  /**
   * The engine, or the id of one of the fleet's engines (the fleet board): the tile then takes the engine's current
   * values from the fleet's live list itself, so a live update gives no new input to the 2,000 tiles of a board and a
   * tile off screen is not checked at all (setting every tile's input re-checked every tile on each update, the
   * longest task of the board under the push bench).
   */
  readonly engine = input.required<Engine | number>();
  private readonly injector = inject(Injector);
  private readonly source = computed<Engine | undefined>(() => {
    const e = this.engine();
    return typeof e === 'number' ? this.injector.get(FleetService).engineById().get(e) : e;
  });
  /** The site's zone, for "last 11:15" (the browser's when not given). */
  readonly timeZone = input<string | null>(null);

  /** On screen or near it (focused counts too); until the observer says otherwise, it is. */
  private readonly onScreen = signal(true);
  private readonly focused = signal(false);
  private drawn: { engine: Engine; now: number } | null = null;
  /**
   * What the tile draws: the engine and the clock as they are while it can be seen; off screen the last drawn
   * state stays and nothing below is worked out again, so 2,000 tiles do not all redraw on every update.
   */
  private readonly view = computed(() => {
    if (this.drawn && !this.onScreen() && !this.focused()) return this.drawn;
    const engine = this.source();
    if (!engine) return this.drawn ?? { engine: UNKNOWN_ENGINE, now: this.clock.now() }; // gone from the list: its tile goes too
    return (this.drawn = { engine, now: this.clock.now() });
  });
  protected readonly current = computed(() => this.view().engine);
  private readonly now = computed(() => this.view().now);

  constructor() {
    const host = inject(ElementRef<HTMLElement>).nativeElement as HTMLElement;
    const onScreen = inject(OnScreen);
    let stop: () => void = () => undefined;
    afterNextRender(() => (stop = onScreen.watch(host, (visible) => this.onScreen.set(visible))));
    // a keyboard or screen-reader user on a tile hears it as it is now, scrolled to or not
    const focusIn = () => this.focused.set(true);
    const focusOut = () => this.focused.set(false);
    host.addEventListener('focusin', focusIn);
    host.addEventListener('focusout', focusOut);
    inject(DestroyRef).onDestroy(() => {
      stop();
      host.removeEventListener('focusin', focusIn);
      host.removeEventListener('focusout', focusOut);
    });
  }

  protected readonly state = computed(() => runStateAt(this.current(), this.now()));
  protected readonly stateText = computed(() => STATE_TEXT[this.state()]);
  protected readonly stateIcon = computed(() => STATE_ICON[this.state()]);
  protected readonly dutyText = computed(() => DUTY_TEXT[this.current().duty] ?? this.current().duty);
  // Live count from the alarms feature once it has loaded; the engine's own field until then.
  protected readonly alarms = computed(() => this.alarmStore.activeFor(this.current().id) ?? this.current().activeAlarms ?? 0);

  private readonly zone = computed(() => this.zones.zoneFor(this.timeZone()));
  private readonly interval = computed(() => {
    this.now(); // learned from live messages, read again on each tick
    return this.cadence.intervalFor(this.current().id);
  });
  /** Any value on the tile is older than the engine's expected interval. */
  protected readonly stale = computed(() => isEngineStale(this.current(), this.now(), this.interval()));
  /** "last 11:15 · 12 min ago" while stale. */
  protected readonly age = computed(() => {
    if (!this.stale()) return null;
    const last = lastReadingAt(this.current());
    return last === null ? null : staleText(last, this.now(), this.zone());
  });

  protected readonly rows = computed<TileRow[]>(() => {
    const e = this.current();
    const state = this.state();
    const now = this.now();
    const interval = this.interval();
    return TILE_CHANNELS.map(({ key, short }) => {
      const latest = e.latest?.[key];
      const bad = !!latest && latest.quality !== 0;
      return {
        key,
        short,
        label: CHANNELS[key].label,
        value: latest && !bad ? latest.value : null,
        bad,
        stale: isValueStale(e, key, now, interval),
        band: normalBand(key, state, e),
        scale: DISPLAY_SCALES[key] ?? { low: 0, high: 100 },
      };
    });
  });

  /** "freezes at -20.6 °C, needs -25.0 °C or colder (test 2026-11-01 10:00 MST)" when the latest test is short of the site's design low. */
  protected readonly freezeShort = computed(() => {
    const f = this.current().freezeProtection;
    if (!f || f.status !== 'short') return null;
    const prefs = this.prefs.preferences();
    const at = formatInZone(f.testedAt, this.zone());
    return `freezes at ${formatStored(f.freezePointC, 'temperature', prefs)}, needs ${formatStored(f.requiredC, 'temperature', prefs)} or colder (test ${at})`;
  });

  /** Everything the tile says, for a screen reader in one sentence. */
  protected readonly summary = computed(() => {
    const prefs = this.prefs.preferences();
    const parts = [`${this.current().name}, ${this.dutyText()}`, this.stateText() + (this.age() ? `, not current: ${this.age()}` : '')];
    if (this.current().outOfService) parts.push('out of service');
    const ready = this.current().readiness;
    if (ready) parts.push(ready.ready ? 'ready to start' : `not ready: ${ready.reasons.join('; ')}`);
    const freeze = this.freezeShort();
    if (freeze) parts.push(`freeze protection short: ${freeze}`);
    for (const row of this.rows()) {
      if (row.bad) {
        parts.push(`${row.short} bad reading`);
        continue;
      }
      const pos = row.value !== null && row.band ? bandPosition(row.value, row.band) : null;
      const where = pos === 'low' ? ' below normal' : pos === 'high' ? ' above normal' : '';
      parts.push(`${row.short} ${formatStored(row.value, row.key, prefs)}${where}`);
    }
    parts.push(`${this.alarms()} active ${this.alarms() === 1 ? 'alarm' : 'alarms'}`);
    return parts.join('; ');
  });
}
