import { finalize, forkJoin } from 'rxjs';
import { browserZone, formatInZone } from '../ui/time-format';
import { ChangeDetectionStrategy, Component, DestroyRef, ElementRef, afterNextRender, computed, effect, inject, input, signal, untracked } from '@angular/core';
import {
  ApexAnnotations,
  ApexAxisChartSeries,
  ApexChart,
  ApexStroke,
  ApexXAxis,
  ApexYAxis,
  ChartComponent,
  PointAnnotations,
  XAxisAnnotations,
} from 'ng-apexcharts';
import { PreferencesService } from '../core/preferences.service';
import { niceExtent } from '../engine/trend-chart';
import { CooldownTrace, ReadingBucket, buildCooldown } from './cooldown-series';
import { WorkApi } from './work-api';
import { OpeningCheck } from './work-types';

/** Neutral greys; the limit line is the only darker mark. Colour is kept for abnormal states (the panel's border). */
const INK = {
  light: { line: '#3b4247', fit: '#7d878e', limit: '#1b1d1f', mark: '#54585c' },
  dark: { line: '#dde1e4', fit: '#98a1a8', limit: '#f1f1f1', mark: '#b4b8bc' },
};

interface TraceView {
  key: 'temp' | 'pressure';
  title: string;
  trace: CooldownTrace;
  series: ApexAxisChartSeries;
  yaxis: ApexYAxis;
  annotations: ApexAnnotations;
  text: string;
}

const time = (t: number) => formatInZone(t, browserZone(), 'time-s');
const fmt = (v: number, unit: string) => `${v.toFixed(unit === 'kPa' ? 0 : unit === 'bar' ? 2 : 1)} ${unit}`;

/**
 * Cool-down since the engine stopped: coolant temperature and pressure (bucket means, one per pixel at most),
 * the fitted Newton curve through the newest reading carried forward to the limit, the limit line, and the
 * predicted clear time. Reloaded with every opening-check result (each 5 s), never more than one request
 * per channel in flight. The numbers come from the shared fit; the chart only draws them.
 */
@Component({
  selector: 'jw-cooldown-chart',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ChartComponent],
  template: `
    @for (v of views(); track v.key) {
      <section class="trace" [attr.aria-label]="v.title + ' since the stop, in ' + v.trace.unit">
        <h3 class="title">
          {{ v.title }} since the stop <span class="unit">{{ v.trace.unit }}</span>
        </h3>
        <apx-chart
          [chart]="chart()"
          [series]="v.series"
          [xaxis]="xaxis()"
          [yaxis]="v.yaxis"
          [annotations]="v.annotations"
          [stroke]="stroke"
          [colors]="colors()"
          [legend]="legend"
          [dataLabels]="dataLabels"
          [markers]="markers"
          [tooltip]="tooltip"
          [grid]="grid()"
          [theme]="theme()"
        />
        <p class="state" [class.blocked]="v.trace.why === 'heater'">{{ v.text }}</p>
      </section>
    }
    <p class="key" aria-hidden="true">
      <span class="sw line"></span> measured <span class="sw fit"></span> fitted cool-down curve <span class="sw limit"></span> limit
    </p>
  `,
  styles: `
    :host {
      display: block;
      min-width: 0;
      overflow: hidden;
    }
    .title {
      margin: 8px 0 0;
      font-size: 14px;
      font-weight: 500;
    }
    .unit {
      color: var(--jw-muted-text);
      font-weight: 400;
    }
    .state {
      margin: 0 0 4px;
      font-size: 13px;
    }
    .state.blocked {
      font-weight: 700;
    }
    .key {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 6px;
      font-size: 12px;
      color: var(--jw-muted-text);
      margin: 0;
    }
    .sw {
      display: inline-block;
      width: 18px;
      height: 0;
      margin-left: 10px;
      border-top: 2px solid var(--jw-marker);
    }
    .sw.fit {
      border-top-style: dashed;
      border-color: var(--jw-band-normal);
    }
    .sw.limit {
      border-top: 2px dotted var(--jw-marker);
    }
  `,
})
export class CooldownChart {
  private readonly api = inject(WorkApi);
  private readonly prefs = inject(PreferencesService);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly destroyRef = inject(DestroyRef);

  readonly engineId = input.required<number>();
  /** The newest opening-check result; each one reloads the readings. */
  readonly check = input.required<OpeningCheck>();
  /** ms the engine stopped. */
  readonly stopTs = input.required<number>();

  private readonly temp = signal<readonly ReadingBucket[]>([]);
  private readonly pressure = signal<readonly ReadingBucket[]>([]);
  private readonly width = signal(600);
  private inFlight = false;

  private readonly ink = computed(() => (this.prefs.dark() ? INK.dark : INK.light));
  protected readonly theme = computed(() => ({ mode: this.prefs.dark() ? ('dark' as const) : ('light' as const) }));
  protected readonly colors = computed(() => [this.ink().line, this.ink().fit]);
  protected readonly grid = computed(() => ({ borderColor: this.prefs.dark() ? '#33373a' : '#e3e5e7', strokeDashArray: 2 }));
  protected readonly stroke: ApexStroke = { curve: 'straight', width: [2, 2], dashArray: [0, 6] };
  protected readonly legend = { show: false };
  protected readonly dataLabels = { enabled: false };
  protected readonly markers = { size: 0, hover: { size: 3 } };
  protected readonly tooltip = { shared: false, x: { format: 'HH:mm:ss' } };
  protected readonly chart = computed<ApexChart>(() => ({
    type: 'line',
    height: 150,
    animations: { enabled: false },
    fontFamily: 'Roboto Condensed, sans-serif',
    background: 'transparent',
    toolbar: { show: false },
    zoom: { enabled: false },
  }));

  protected readonly model = computed(() => {
    const c = this.check();
    const s = c.settings;
    return buildCooldown({
      stopTs: this.stopTs(),
      temp: this.temp(),
      pressure: this.pressure(),
      safeOpenTempC: s.safeOpenTempC,
      maxPressureKpa: s.maxPressureKpa,
      heaterSetpointC: s.heaterSetpointC ?? null,
      ambientC: s.ambientC ?? null,
      prefs: this.prefs.preferences(),
      maxPoints: this.width(),
    });
  });

  /** From the stop to whichever is last: now, a predicted crossing, the predicted clear time. */
  protected readonly xaxis = computed<ApexXAxis>(() => {
    const m = this.model();
    const now = Date.parse(this.check().at);
    const ends = [now, m.temp.reachAt, m.pressure.reachAt, this.check().clearAt, ...[m.temp, m.pressure].map((t) => t.fitted.at(-1)?.x ?? null)];
    const to = Math.max(...ends.filter((v): v is number => typeof v === 'number' && Number.isFinite(v)));
    const from = this.stopTs();
    return { type: 'datetime', min: from, max: to + (to - from) * 0.04, labels: { datetimeUTC: false }, tooltip: { enabled: false } };
  });

  protected readonly views = computed<TraceView[]>(() => {
    const m = this.model();
    const ink = this.ink();
    const clearAt = this.check().clearAt;
    return [this.view('temp', 'Coolant temperature', m.temp, ink, clearAt), this.view('pressure', 'Coolant pressure', m.pressure, ink, clearAt)];
  });

  constructor() {
    // not a resource: each opening-check answer moves the window, and a resource would cancel the request
    // still out and blank the chart; this keeps what is drawn and skips a round while a request is out
    effect(() => {
      const id = this.engineId();
      const at = Date.parse(this.check().at);
      const from = this.stopTs();
      const points = this.width();
      untracked(() => this.load(id, from, at, points));
    });
    afterNextRender(() => this.observeWidth());
  }

  private load(id: number, from: number, to: number, points: number): void {
    if (this.inFlight || !(to > from)) return;
    this.inFlight = true;
    forkJoin([this.api.readings(id, 'coolant_temp', from, to, points), this.api.readings(id, 'coolant_pressure', from, to, points)])
      .pipe(finalize(() => (this.inFlight = false)))
      .subscribe({
        next: ([t, p]) => {
          this.temp.set(t);
          this.pressure.set(p);
        },
        // the next opening-check result tries again; the panel shows the check's own words meanwhile
        error: () => undefined,
      });
  }

  private view(key: 'temp' | 'pressure', title: string, t: CooldownTrace, ink: (typeof INK)['light'], clearAt: number | null): TraceView {
    const ys = [...t.measured, ...t.fitted].map((p) => p.y).concat(t.limit);
    // round ticks, four steps, from the limit (or below) to the hottest reading
    const y = niceExtent(Math.min(...ys), Math.max(...ys));
    const dec = t.unit === 'bar' ? 2 : t.unit === 'kPa' ? 0 : 1;
    const xaxis: XAxisAnnotations[] = [];
    if (clearAt !== null) {
      xaxis.push({
        x: clearAt,
        borderColor: ink.mark,
        strokeDashArray: 3,
        label: {
          text: `forecast clear ${time(clearAt)}`,
          orientation: 'horizontal',
          position: 'top',
          textAnchor: 'end',
          borderWidth: 0,
          style: { background: 'transparent', color: ink.mark, fontSize: '11px' },
        },
      });
    }
    const points: PointAnnotations[] = [];
    if (t.reachAt !== null) {
      points.push({
        x: t.reachAt,
        y: t.limit,
        marker: { size: 5, shape: 'square', fillColor: ink.limit, strokeColor: ink.limit },
        label: {
          text: `reaches limit ${time(t.reachAt)}`,
          borderWidth: 0,
          offsetY: -4,
          style: { background: 'transparent', color: ink.mark, fontSize: '11px' },
        },
      });
    }
    return {
      key,
      title,
      trace: t,
      series: [
        { name: 'Measured', type: 'line', data: t.measured },
        { name: 'Fitted', type: 'line', data: t.fitted },
      ],
      yaxis: {
        min: y.lo,
        max: y.hi,
        tickAmount: 4,
        title: { text: t.unit },
        labels: { minWidth: 48, maxWidth: 48, formatter: (v: number) => (Number.isFinite(v) ? v.toFixed(dec) : '') },
      },
      annotations: {
        yaxis: [
          {
            y: t.limit,
            borderColor: ink.limit,
            strokeDashArray: 2,
            label: {
              text: `limit ${fmt(t.limit, t.unit)}`,
              position: 'left',
              textAnchor: 'start',
              offsetX: 4,
              borderWidth: 0,
              style: { background: 'transparent', color: ink.limit, fontSize: '11px' },
            },
          },
        ],
        xaxis,
        points,
      },
      text: describe(title, t),
    };
  }

  private observeWidth(): void {
    const el = this.host.nativeElement;
    const report = (w: number) => {
      // steps of 40 px, so a small resize does not reload
      const width = Math.max(120, Math.floor(w / 40) * 40);
      if (width !== this.width()) this.width.set(width);
    };
    report(el.clientWidth || 600);
    if (typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver((entries) => report(entries[0]?.contentRect.width ?? el.clientWidth));
    ro.observe(el);
    this.destroyRef.onDestroy(() => ro.disconnect());
  }
}

/** The state of one trace in words (the chart is never the only carrier). */
export function describe(title: string, t: CooldownTrace): string {
  const last = t.measured.at(-1);
  if (!last) return `${title}: no readings since the stop yet.`;
  const now = `${title} ${fmt(last.y, t.unit)}`;
  if (t.met) return `${now}: at or below the limit ${fmt(t.limit, t.unit)}.`;
  if (t.reachAt !== null && t.band) {
    return `${now}, above the limit ${fmt(t.limit, t.unit)}: forecast to reach it about ${time(t.reachAt)} (between ${time(t.band.earliest)} and ${t.band.latest === null ? 'an unknown later time' : time(t.band.latest)}; the surroundings' temperature is estimated, not measured).`;
  }
  if (t.reachAt !== null) return `${now}, above the limit ${fmt(t.limit, t.unit)}: forecast to reach it about ${time(t.reachAt)}.`;
  if (t.why === 'rising') return `${now}, above the limit ${fmt(t.limit, t.unit)}: rising (heat soak after the stop), no forecast until it falls.`;
  if (t.why === 'heater')
    return `${now}, above the limit ${fmt(t.limit, t.unit)}: it levels off at the heater setpoint and can never reach the limit while the heater is on.`;
  if (t.why === 'ambient')
    return `${now}, above the limit ${fmt(t.limit, t.unit)}: the surroundings are as warm as the limit, so it will not cool below it by itself.`;
  return `${now}, above the limit ${fmt(t.limit, t.unit)}: ${t.why ?? 'no forecast'}, no forecast yet.`;
}
