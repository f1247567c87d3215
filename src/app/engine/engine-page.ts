import { DOCUMENT, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipsModule } from '@angular/material/chips';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Title } from '@angular/platform-browser';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { EMPTY, Subscription, catchError, debounceTime, forkJoin, map, of, switchMap, tap } from 'rxjs';
import { CHANNELS, CHANNEL_KEYS, ChannelKey, isChannelKey } from '../../../shared/channels';
import { ClockService } from '../core/clock.service';
import { DisplayZone } from '../core/display-zone';
import { ReadingCadence, isStale, staleText } from '../core/staleness';
import { ChannelValues } from '../core/live-reading';
import { LiveService } from '../core/live.service';
import { PreferencesService } from '../core/preferences.service';
import { Engine, RunState, Site } from '../fleet/fleet-types';
import { lastReadingAt, runStateAt, toMillis } from '../fleet/run-state';
import { JwTimePipe, zoneAbbreviation } from '../ui/time-format';
import { UnitValuePipe } from '../ui/unit-value.pipe';
import { EngineService } from './engine.service';
import { EngineHome } from './engine-home';
import { LiveValues } from './live-values';
import { ReadinessStatus } from '../ui/readiness-status';
import { RangePicker } from './range-picker';
import { bucketsToCsv, downloadText } from './readings-csv';
import { RecentReading, RecentReadings } from './recent-readings';
import { DEFAULT_PRESET, TREND_NOW, TrendRange, presetRange, rangeFromQuery, rangeToQuery, refreshRange, sameRange } from './trend-range';
import { TrendChart, TrendWindow } from './trend-chart';
import { Bucket, LiveSample, appendLive, bucketWidth, runChanges } from './trend-series';
import { RAW_SOURCE, TrendSource, combineSources } from './trend-source';

const STATE_TEXT: Record<RunState, string> = { running: 'Running', stopped: 'Stopped', 'no-data': 'No data' };
const STATE_ICON: Record<RunState, string> = { running: 'sync', stopped: 'stop_circle', 'no-data': 'cloud_off' };
const DUTY_TEXT: Record<string, string> = { standby: 'Standby', prime: 'Prime', continuous: 'Continuous' };
const FAMILY_TEXT: Record<string, string> = { conventional: 'Conventional (with SCA)', 'extended-life': 'Extended-life' };

/** The chart is drawn again with live readings at most this often. */
const LIVE_REDRAW_MS = 2000;
/** Recent readings kept for the table. */
const RECENT_MAX = 200;
/** Live samples held between redraws, per channel (the server sends at most 4 a second). */
const PENDING_MAX = 100;
/** A standby engine's readiness (heater, alarms, lockouts) is computed by the server: asked again this often. */
const READINESS_EVERY_MS = 15_000;

interface TrendRequest {
  engineId: number;
  channels: ChannelKey[];
  window: TrendWindow;
  points: number;
}

/** One engine: who it is, how it is doing now, and how it did over a chosen window. */
@Component({
  selector: 'jw-engine-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    RouterLink,
    MatCardModule,
    MatIconModule,
    MatButtonModule,
    MatChipsModule,
    MatProgressBarModule,
    DecimalPipe,
    UnitValuePipe,
    JwTimePipe,
    LiveValues,
    RangePicker,
    TrendChart,
    RecentReadings,
    EngineHome,
    ReadinessStatus,
  ],
  templateUrl: './engine-page.html',
  styleUrl: './engine-page.scss',
})
export class EnginePage {
  private readonly api = inject(EngineService);
  private readonly live = inject(LiveService);
  private readonly clock = inject(ClockService);
  private readonly prefs = inject(PreferencesService);
  private readonly now = inject(TREND_NOW);
  private readonly title = inject(Title);
  private readonly document = inject(DOCUMENT);
  private readonly destroyRef = inject(DestroyRef);
  private readonly zones = inject(DisplayZone);
  private readonly cadence = inject(ReadingCadence);

  /** Route parameter (withComponentInputBinding). */
  readonly id = input<string>();
  private readonly router = inject(Router);
  private readonly route = inject(ActivatedRoute);
  /** Query parameters: the trend's range and channels live in the address. */
  private readonly query = toSignal(this.route.queryParamMap);
  private readonly rangeParam = computed(() => this.query()?.get('range') ?? undefined);
  private readonly fromParam = computed(() => this.query()?.get('from') ?? undefined);
  private readonly toParam = computed(() => this.query()?.get('to') ?? undefined);
  private readonly channelsParam = computed(() => this.query()?.get('channels') ?? undefined);
  protected readonly engineId = computed(() => {
    const n = Number(this.id());
    return Number.isInteger(n) && n > 0 ? n : null;
  });

  protected readonly engine = signal<Engine | null>(null);
  protected readonly site = signal<Site | null>(null);
  /** A standby engine's readiness to start (from the server); undefined for other duties. */
  protected readonly readiness = signal<Engine['readiness']>(undefined, { equal: (a, b) => JSON.stringify(a) === JSON.stringify(b) });
  protected readonly loadError = signal<string | null>(null);
  protected readonly notFound = signal(false);
  /** Bumped by Retry: loads the engine again. */
  private readonly attempt = signal(0);
  /** Times on this page: the site's zone, or the browser's by preference. */
  protected readonly zone = computed(() => this.zones.zoneFor(this.site()?.timeZone));
  protected readonly zoneLabel = computed(() => `${this.zone()} (${zoneAbbreviation(this.clock.now(), this.zone())})`);

  protected readonly state = computed<RunState>(() => {
    const e = this.engine();
    return e ? runStateAt(e, this.clock.now()) : 'no-data';
  });
  protected readonly stateText = computed(() => STATE_TEXT[this.state()]);
  protected readonly stateIcon = computed(() => STATE_ICON[this.state()]);
  protected readonly dutyText = computed(() => DUTY_TEXT[this.engine()?.duty ?? ''] ?? this.engine()?.duty ?? '');
  protected readonly familyText = computed(() => FAMILY_TEXT[this.engine()?.coolantFamily ?? ''] ?? this.engine()?.coolantFamily ?? '');
  /** Only what the trend's bands need, so live values do not redraw the charts. */
  protected readonly bandEngine = computed(() => ({ heaterSetpointC: this.engine()?.heaterSetpointC ?? null }), {
    equal: (a, b) => a.heaterSetpointC === b.heaterSetpointC,
  });
  protected readonly lastSeen = computed(() => toMillis(this.engine()?.lastSeenAt));
  /** "last 11:15 MST · 12 min ago" once the newest reading is older than the engine's expected interval. */
  protected readonly staleNow = computed(() => {
    const e = this.engine();
    const last = e ? lastReadingAt(e) : null;
    const now = this.clock.now();
    if (!e || last === null || !isStale(last, now, this.cadence.intervalFor(e.id))) return null;
    return staleText(last, now, this.zone());
  });

  // --- trend ---
  protected readonly allChannels = CHANNEL_KEYS.map((key) => ({ key, label: CHANNELS[key].label }));
  protected readonly channels = signal<ChannelKey[]>(DEFAULT_CHANNELS);
  protected readonly range = signal<TrendRange>(presetRange(DEFAULT_PRESET, this.now()));
  /** A window the user zoomed into; null shows the whole range. */
  protected readonly zoom = signal<TrendWindow | null>(null);
  protected readonly width = signal(0);
  protected readonly trendWindow = computed<TrendWindow>(() => {
    const z = this.zoom();
    const r = this.range();
    return z ?? { from: r.from, to: r.to };
  });
  /** Live readings extend the trend only while it shows a window that ends now. */
  private readonly following = computed(() => this.zoom() === null && this.range().live);
  protected readonly data = signal<ReadonlyMap<ChannelKey, readonly Bucket[]>>(new Map());
  /** Raw readings or per-minute summaries, and whether the window reaches back past the raw retention. */
  protected readonly source = signal<TrendSource>(RAW_SOURCE);
  private readonly speed = signal<readonly Bucket[]>([]);
  protected readonly loadingTrend = signal(false);
  protected readonly trendError = signal<string | null>(null);
  protected readonly runChanges = computed(() => runChanges(this.speed()), {
    equal: (a, b) => a.length === b.length && a.every((c, i) => c.t === b[i].t && c.kind === b[i].kind),
  });
  private lastRequest: TrendRequest | null = null;
  private pending = new Map<ChannelKey, LiveSample[]>();

  protected readonly recent = signal<RecentReading[]>([]);

  constructor() {
    // The address says which range and channels to show (back, reload and shared links keep them).
    effect(() => {
      const fromQuery = rangeFromQuery({ range: this.rangeParam(), from: this.fromParam(), to: this.toParam() }, this.now());
      const channels = channelsFromQuery(this.channelsParam());
      untracked(() => {
        if (!sameRange(fromQuery, this.range())) {
          this.zoom.set(null);
          this.range.set(fromQuery);
        }
        if (channels.join() !== this.channels().join()) this.channels.set(channels);
      });
    });

    effect((onCleanup) => {
      const id = this.engineId();
      this.attempt();
      if (id === null) {
        this.notFound.set(true);
        this.loadError.set('There is no engine with this address.');
        return;
      }
      const sub = untracked(() => this.load(id));
      onCleanup(() => sub.unsubscribe());
    });

    // Back from a lost connection: a page that failed to load tries again by itself.
    let wasLost = false;
    effect(() => {
      if (this.live.lostSince() !== null) {
        wasLost = true;
      } else if (wasLost && this.live.connection() === 'connected') {
        wasLost = false;
        if (untracked(() => this.loadError() !== null && !this.notFound())) this.retry();
      }
    });

    effect(() => {
      const name = this.engine()?.name;
      untracked(() => this.title.setTitle(name ? `${name} · Jacketwatch` : 'Engine · Jacketwatch'));
    });

    const request = computed<TrendRequest | null>(() => {
      const engineId = this.engineId();
      const width = this.width();
      if (engineId === null || width === 0) return null;
      return { engineId, channels: this.channels(), window: this.trendWindow(), points: width };
    });
    toObservable(request)
      .pipe(
        debounceTime(150),
        switchMap((req) => (req ? this.fetchTrend(req) : EMPTY)),
      )
      .subscribe();

    const timer = setInterval(() => this.applyLive(), LIVE_REDRAW_MS);
    this.destroyRef.onDestroy(() => clearInterval(timer));
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  protected chooseRange(range: TrendRange): void {
    this.zoom.set(null);
    this.range.set(range);
    this.setQuery(rangeToQuery(range));
  }

  protected toggleChannel(key: ChannelKey, on: boolean): void {
    this.channels.update((list) => {
      const next = on ? [...new Set([...list, key])] : list.filter((k) => k !== key);
      return CHANNEL_KEYS.filter((k) => next.includes(k));
    });
    this.setQuery({ channels: channelsToQuery(this.channels()) });
  }

  /** A new entry in the browser history, so the back button returns to the range shown before. */
  private setQuery(params: Record<string, string | null>): void {
    void this.router.navigate([], { relativeTo: this.route, queryParams: params, queryParamsHandling: 'merge' });
  }

  protected onZoom(win: TrendWindow): void {
    const z = this.zoom();
    if (z && z.from === win.from && z.to === win.to) return; // the other charts of the group report the same window
    this.zoom.set(win);
  }

  protected resetZoom(): void {
    if (this.zoom() === null) return;
    this.zoom.set(null);
    this.range.update((r) => refreshRange(r, this.now()));
  }

  protected exportCsv(): void {
    const e = this.engine();
    const win = this.trendWindow();
    const stamp = (ms: number) => new Date(ms).toISOString().slice(0, 16).replace(/[:]/g, '');
    const name = `engine-${e?.id ?? 'x'}-${stamp(win.from)}-${stamp(win.to)}.csv`;
    downloadText(this.document, name, bucketsToCsv(this.data(), this.prefs.preferences(), this.source()));
  }

  private load(id: number): Subscription {
    this.loadError.set(null);
    this.notFound.set(false);
    // One parent for all three: the HTTP part completes, the live part must not end with it.
    const sub = new Subscription();
    sub.add(
      forkJoin([this.api.engine(id), this.api.sites().pipe(catchError(() => of([] as Site[])))]).subscribe({
        next: ([engine, sites]) => {
          this.engine.set({ ...engine, latest: liveValues(engine.latest ?? {}) });
          this.readiness.set(engine.readiness);
          this.site.set(sites.find((s) => s.id === engine.siteId) ?? null);
          this.recent.set(recentFrom(engine.latest ?? {}));
        },
        error: (err: { status?: number }) => {
          this.notFound.set(err?.status === 404);
          this.loadError.set(err?.status === 404 ? 'There is no engine with this address.' : 'The engine could not be loaded.');
        },
      }),
    );
    const unwatch = this.live.watch({ engineIds: [id] });
    sub.add(unwatch);
    // a standby engine's readiness changes without a reload: asked again now and then, kept in its own signal
    // (the engine itself, which the trend's inputs come from, is left alone)
    const readiness = setInterval(() => {
      if (this.readiness() === undefined) return;
      sub.add(this.api.readiness(id).subscribe({ next: (r) => this.readiness.set(r), error: () => undefined })); // kept on a failure; the next round tries again
    }, READINESS_EVERY_MS);
    sub.add(() => clearInterval(readiness));
    sub.add(this.live.readingsFor(id).subscribe((msg) => this.onLive(liveValues(msg.values))));
    return sub;
  }

  private fetchTrend(req: TrendRequest) {
    this.loadingTrend.set(true);
    this.trendError.set(null);
    const wanted = [...new Set<ChannelKey>([...req.channels, 'engine_speed'])];
    const q = (channel: ChannelKey) => this.api.readings(req.engineId, { channel, from: req.window.from, to: req.window.to, points: req.points });
    return forkJoin(wanted.map((ch) => q(ch).pipe(map((r) => [ch, r] as const)))).pipe(
      tap((results) => {
        const all = new Map<ChannelKey, readonly Bucket[]>(results.map(([ch, r]) => [ch, r.buckets]));
        this.source.set(combineSources(results.map(([, r]) => r)));
        this.speed.set(all.get('engine_speed') ?? []);
        this.data.set(new Map(req.channels.map((ch) => [ch, all.get(ch) ?? []])));
        this.lastRequest = req;
        this.pending.clear();
        this.loadingTrend.set(false);
      }),
      catchError(() => {
        this.trendError.set('The trend could not be loaded. Choose the range again to retry.');
        this.loadingTrend.set(false);
        return EMPTY;
      }),
    );
  }

  private onLive(values: ChannelValues): void {
    const rows: RecentReading[] = [];
    let newest: number | null = null;
    for (const [key, v] of Object.entries(values) as [ChannelKey, NonNullable<ChannelValues[ChannelKey]>][]) {
      const t = toMillis(v.ts);
      if (t === null) continue;
      rows.push({ t, channel: key, value: v.value, quality: v.quality });
      if (newest === null || t > newest) newest = t;
      if (v.quality === 0 && this.following()) {
        const list = this.pending.get(key) ?? [];
        list.push({ t, value: v.value });
        if (list.length > PENDING_MAX) list.splice(0, list.length - PENDING_MAX);
        this.pending.set(key, list);
      }
    }
    this.engine.update((e) => (e ? { ...e, latest: { ...e.latest, ...values }, lastSeenAt: newest ?? e.lastSeenAt } : e));
    if (rows.length) this.recent.update((list) => [...rows.sort((a, b) => b.t - a.t), ...list].slice(0, RECENT_MAX));
  }

  /** Folds the live samples gathered since the last redraw into the trend, keeping it bounded. */
  private applyLive(): void {
    const req = this.lastRequest;
    if (!req || !this.pending.size || !this.following() || this.loadingTrend()) return;
    const r = this.range();
    const now = this.now();
    const from = now - (r.to - r.from);
    const opts = { from, maxPoints: req.points, bucketMs: bucketWidth(req.window.from, req.window.to, req.points) };
    const pending = this.pending;
    this.pending = new Map();
    const speed = pending.get('engine_speed');
    if (speed) this.speed.update((b) => appendLive(b, speed, opts));
    this.data.update((data) => {
      const next = new Map(data);
      for (const [ch, buckets] of data) {
        const samples = pending.get(ch);
        if (samples) next.set(ch, appendLive(buckets, samples, opts));
      }
      return next;
    });
  }
}

const DEFAULT_CHANNELS: ChannelKey[] = ['coolant_temp', 'coolant_pressure', 'coolant_conductivity'];

/** `channels=coolant_temp,engine_speed`; absent: the default three; empty: none. */
export function channelsFromQuery(value: string | null | undefined): ChannelKey[] {
  if (value === undefined || value === null) return DEFAULT_CHANNELS;
  const asked = new Set(value.split(',').map((v) => v.trim()));
  return CHANNEL_KEYS.filter((k) => asked.has(k));
}

function channelsToQuery(channels: ChannelKey[]): string | null {
  return channels.join() === DEFAULT_CHANNELS.join() ? null : channels.join(',');
}

/** Live values keyed by channel (the server may also use channel codes). */
function liveValues(values: Record<string, unknown>): ChannelValues {
  const out: ChannelValues = {};
  for (const [key, v] of Object.entries(values)) {
    const channel = isChannelKey(key) ? key : CHANNEL_KEYS.find((k) => String(CHANNELS[k].code) === key);
    const cv = v as { value?: unknown; ts?: number | string; quality?: number } | null;
    if (channel && cv && typeof cv.value === 'number' && cv.ts !== undefined) out[channel] = { value: cv.value, ts: cv.ts, quality: cv.quality ?? 0 };
  }
  return out;
}

function recentFrom(values: Record<string, unknown>): RecentReading[] {
  const out: RecentReading[] = [];
  for (const [channel, v] of Object.entries(liveValues(values)) as [ChannelKey, NonNullable<ChannelValues[ChannelKey]>][]) {
    const t = toMillis(v.ts);
    if (t !== null) out.push({ t, channel, value: v.value, quality: v.quality });
  }
  return out.sort((a, b) => b.t - a.t);
}
