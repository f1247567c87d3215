import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  afterNextRender,
  computed,
  effect,
  inject,
  input,
  output,
  untracked,
  viewChildren,
} from '@angular/core';
import {
  ApexAnnotations,
  ApexAxisChartSeries,
  ApexChart,
  ApexFill,
  ApexStroke,
  ApexTooltip,
  ApexXAxis,
  ApexYAxis,
  ChartComponent,
  XAxisAnnotations,
  YAxisAnnotations,
} from 'ng-apexcharts';
import { CHANNELS, ChannelKey } from '../../../shared/channels';
import { BandEngine, NormalBand, normalBand } from '../../../shared/normal-bands';
import { PreferencesService } from '../core/preferences.service';
import { formatInZone } from '../ui/time-format';
import { convertStored, quantityOf } from '../ui/unit-format';
import { trendAxisLabel } from './trend-axis';
import { Bucket, RunChange, toChannelSeries } from './trend-series';

/** The window on screen, ms since epoch. */
export interface TrendWindow {
  from: number;
  to: number;
}

interface ChannelView {
  channel: ChannelKey;
  label: string;
  unit: string;
  chart: ApexChart;
  xaxis: ApexXAxis;
  yaxis: ApexYAxis;
  annotations: ApexAnnotations;
  /** The window and run changes the chart is first drawn with; later ones are applied in place. */
  drawnFor: Moving;
}

/** What moves with the data: applied to a drawn chart in place, never by building it again. */
interface Moving {
  win: TrendWindow;
  changes: readonly RunChange[];
  /** The zone the axis labels are written in (the site's arrives after the first draw at times). */
  zone: string | null;
}

const DECIMALS: Record<string, number> = { '°C': 1, '°F': 1, kPa: 0, psi: 1, bar: 2, 'µS/cm': 0, rpm: 0 };
const GROUP = 'jw-engine-trend';

/** Neutral greys: colour stays for abnormal states, which the trend does not judge. */
const INK = {
  light: { line: '#3b4247', range: '#8d969c', band: '#7d878e', mark: '#54585c' },
  dark: { line: '#dde1e4', range: '#98a1a8', band: '#aab3b9', mark: '#b4b8bc' },
};

/**
 * Trends of the chosen channels, one small chart each on a shared time axis: the bucket mean as a line,
 * min-max as a shaded band, the normal bands as shaded strips, and the engine's starts and stops as
 * vertical marks. Drag across a chart to zoom; the page then loads that window at a finer step.
 */
@Component({
  selector: 'jw-trend-chart',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ChartComponent],
  template: `
    @for (v of views(); track v.channel) {
      <section class="channel" [attr.aria-label]="v.label + ' trend in ' + v.unit">
        <h3 class="title">
          {{ v.label }} <span class="unit">{{ v.unit }}</span>
        </h3>
        <apx-chart
          [chart]="v.chart"
          [series]="seriesOf(v.channel)"
          [xaxis]="v.xaxis"
          [yaxis]="v.yaxis"
          [annotations]="v.annotations"
          [stroke]="stroke"
          [fill]="fill()"
          [colors]="colors()"
          [legend]="legend"
          [dataLabels]="dataLabels"
          [tooltip]="tooltip"
          [grid]="grid()"
          [markers]="markers"
          [noData]="noData"
          [theme]="theme()"
        />
      </section>
    } @empty {
      <p class="none">Choose at least one channel to draw.</p>
    }
    <p class="key" aria-hidden="true">
      <span class="swatch line"></span> mean per step <span class="swatch range"></span> lowest to highest per step <span class="swatch band"></span> normal
      band <span class="mark start"></span> ▲ started <span class="mark stop"></span> ▼ stopped
    </p>
  `,
  styles: `
    // Clip: a chart being rebuilt or a label at the right edge must never widen the page.
    :host {
      display: block;
      min-width: 0;
      overflow: hidden;
    }
    .channel {
      margin-bottom: 4px;
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
    .none {
      color: var(--jw-muted-text);
    }
    .key {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 6px;
      font-size: 12px;
      color: var(--jw-muted-text);
      margin: 4px 0 0;
    }
    .swatch {
      display: inline-block;
      width: 18px;
      height: 10px;
      margin-left: 10px;
    }
    .swatch.line {
      height: 2px;
      background: var(--jw-marker);
    }
    .swatch.range {
      background: var(--jw-band-normal);
      opacity: 0.45;
    }
    .swatch.band {
      background: var(--jw-band);
      border-top: 1px dashed var(--jw-band-normal);
      border-bottom: 1px dashed var(--jw-band-normal);
    }
    .mark {
      display: inline-block;
      width: 0;
      height: 12px;
      margin-left: 10px;
      border-left: 2px solid var(--jw-muted-text);
    }
    .mark.stop {
      border-left-style: dashed;
    }
  `,
})
export class TrendChart {
  private readonly prefs = inject(PreferencesService);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  /** What the normal bands depend on (the heater); keep it stable, a change redraws the charts. */
  readonly engine = input<BandEngine | null>(null);
  readonly channels = input.required<ChannelKey[]>();
  /** Buckets per channel in stored units. */
  readonly data = input.required<ReadonlyMap<ChannelKey, readonly Bucket[]>>();
  readonly window = input.required<TrendWindow>();
  readonly runChanges = input<readonly RunChange[]>([]);
  /** Height of each channel's chart in px. */
  readonly height = input(190);
  /** The zone times are written in (the site's, or the browser's by preference): axis labels and the tooltip. */
  readonly zone = input<string | null>(null);

  /** The user dragged out a smaller window. */
  readonly zoomed = output<TrendWindow>();
  /** The user asked for the whole range again (the chart's reset button). */
  readonly zoomReset = output<void>();
  /** Drawing width in px, so the page can ask for one bucket per pixel. */
  readonly widthChange = output<number>();

  private readonly dark = this.prefs.dark;
  protected readonly theme = computed(() => ({ mode: this.dark() ? ('dark' as const) : ('light' as const) }));
  private readonly ink = computed(() => (this.dark() ? INK.dark : INK.light));
  protected readonly colors = computed(() => [this.ink().range, this.ink().line]);
  protected readonly fill = computed<ApexFill>(() => ({ type: 'solid', opacity: [0.3, 1] }));
  protected readonly grid = computed(() => ({ borderColor: this.dark() ? '#33373a' : '#e3e5e7', strokeDashArray: 2 }));
  protected readonly stroke: ApexStroke = { curve: 'straight', width: [0, 1.5] };
  protected readonly legend = { show: false };
  protected readonly dataLabels = { enabled: false };
  protected readonly markers = { size: 0, hover: { size: 3 } };
  protected readonly noData = { text: 'No readings in this range' };
  // The zone is read when the tooltip is shown: a tooltip input that changed would rebuild the chart (a blank frame).
  protected readonly tooltip: ApexTooltip = { shared: true, x: { formatter: (v: number) => formatInZone(v, untracked(this.zone), 'datetime-s') } };

  protected readonly series = computed(() => {
    const prefs = this.prefs.preferences();
    const data = this.data();
    const out = new Map<ChannelKey, ApexAxisChartSeries>();
    for (const ch of this.channels()) {
      const s = toChannelSeries(ch, data.get(ch) ?? [], prefs);
      out.set(ch, [
        { name: 'Lowest–highest', type: 'rangeArea', data: s.range },
        { name: 'Mean', type: 'line', data: s.mean },
      ]);
    }
    return out;
  });

  /** Lowest and highest value drawn per channel, in display units. */
  private readonly spans = computed(() => {
    const out = new Map<ChannelKey, { lo: number; hi: number }>();
    for (const [ch, series] of this.series()) {
      let lo = Infinity;
      let hi = -Infinity;
      for (const p of (series[0]?.data ?? []) as { y: [number, number] }[]) {
        if (p.y[0] < lo) lo = p.y[0];
        if (p.y[1] > hi) hi = p.y[1];
      }
      if (Number.isFinite(lo)) out.set(ch, { lo, hi });
    }
    return out;
  });

  /** The drawn charts, to move their window and marks in place. */
  private readonly charts = viewChildren(ChartComponent);
  /** Charts moved since they were drawn, and to what. */
  private readonly applied = new WeakMap<object, Moving>();

  private readonly moving = computed<Moving>(() => ({ win: this.window(), changes: this.runChanges(), zone: this.zone() }));

  /**
   * Everything but the data and what moves with it; it changes rarely, and a change builds the chart again
   * (ng-apexcharts destroys and redraws a chart on any option change but the series, which the operator sees
   * as a flicker). The window and the run marks are read untracked here and applied in place afterwards.
   */
  protected readonly views = computed<ChannelView[]>(() => {
    const prefs = this.prefs.preferences();
    const engine = this.engine();
    const moving = untracked(this.moving);
    const ink = this.ink();
    return this.channels().map((channel, index) => {
      const quantity = quantityOf(channel);
      const unit = toChannelSeries(channel, [], prefs).unit;
      const decimals = DECIMALS[unit] ?? 1;
      const conv = (v: number) => convertStored(v, quantity, prefs).value;
      const chart: ApexChart = {
        id: `jw-trend-${channel}`,
        group: GROUP,
        type: 'rangeArea',
        height: this.height(),
        animations: { enabled: false },
        fontFamily: 'Roboto Condensed, sans-serif',
        background: 'transparent',
        // apexcharts' own resize redraw can leave a chart without its series for a while on a busy machine (a blank
        // chart the operator sees); the width is followed here instead, through a plain redraw (observeWidth).
        redrawOnParentResize: false,
        redrawOnWindowResize: false,
        zoom: { enabled: true, type: 'x', autoScaleYaxis: false },
        toolbar: {
          show: true,
          autoSelected: 'zoom',
          tools: { download: false, selection: false, zoom: true, zoomin: true, zoomout: true, pan: false, reset: true },
        },
        events: {
          zoomed: (_c: unknown, o: { xaxis?: { min?: number; max?: number } }) => {
            const min = o?.xaxis?.min;
            const max = o?.xaxis?.max;
            if (typeof min === 'number' && typeof max === 'number' && max > min) this.zoomed.emit({ from: Math.round(min), to: Math.round(max) });
          },
          beforeResetZoom: () => {
            this.zoomReset.emit();
            const win = untracked(this.window);
            return { xaxis: { min: win.from, max: win.to } };
          },
        },
      };
      const bands = bandAnnotations(channel, engine);
      // The axis spans the data and the normal bands (not from zero), with a little room. apexcharts calls
      // these on every redraw; they read the newest data span, so a live update rescales without a rebuild.
      const lows = bands.map((b) => conv(b.band.low));
      const highs = bands.map((b) => conv(b.band.high));
      const extent = () => {
        const d = this.spans().get(channel);
        const lo = Math.min(...lows, d?.lo ?? Infinity);
        const hi = Math.max(...highs, d?.hi ?? -Infinity);
        if (!Number.isFinite(lo) || !Number.isFinite(hi)) return { lo: 0, hi: 1 };
        return niceExtent(lo, hi);
      };
      const yMin = () => extent().lo;
      const yMax = () => extent().hi;
      const bandsAnnotations = bands.map(({ band, text }) => ({
        y: conv(band.low),
        y2: conv(band.high),
        fillColor: ink.band,
        opacity: 0.14,
        borderColor: ink.band,
        strokeDashArray: 4,
        label: {
          text,
          position: 'left',
          textAnchor: 'start',
          offsetX: 4,
          borderWidth: 0,
          style: { background: 'transparent', color: ink.mark, fontSize: '11px' },
        },
      })) as YAxisAnnotations[];
      const moved = movingOptions(moving, index, ink);
      return {
        channel,
        label: CHANNELS[channel].label,
        unit,
        chart,
        xaxis: moved.xaxis,
        yaxis: {
          title: { text: unit },
          min: yMin,
          tickAmount: 4,
          max: yMax,
          decimalsInFloat: decimals,
          labels: { minWidth: 56, maxWidth: 56, formatter: (v: number) => (Number.isFinite(v) ? v.toFixed(decimals) : '') },
        },
        annotations: {
          yaxis: bandsAnnotations,
          xaxis: moved.annotations.xaxis,
        },
        drawnFor: moving,
      };
    });
  });

  constructor() {
    afterNextRender(() => this.observeWidth());
    // A new window or run mark moves the drawn charts in place (updateOptions redraws synchronously, so no blank frame).
    effect(() => {
      const moving = this.moving();
      const views = this.views();
      const ink = this.ink();
      for (const chart of this.charts()) {
        const instance = chart.chartInstance();
        if (!instance) continue;
        const index = views.findIndex((v) => v.chart.id === chart.chart()?.id);
        if (index < 0) continue;
        const was = this.applied.get(instance) ?? views[index].drawnFor;
        if (was.win === moving.win && was.changes === moving.changes && was.zone === moving.zone) continue;
        this.applied.set(instance, moving);
        const opts = movingOptions(moving, index, ink);
        const yaxis = views[index].annotations.yaxis;
        untracked(() => void instance.updateOptions({ xaxis: opts.xaxis, annotations: { yaxis, xaxis: opts.annotations.xaxis } }, false, false, false));
      }
    });
  }

  protected seriesOf(channel: ChannelKey): ApexAxisChartSeries {
    return this.series().get(channel) ?? [];
  }

  private observeWidth(): void {
    const el = this.host.nativeElement;
    let last = 0;
    let drawnWidth = el.clientWidth;
    let frame = 0;
    // Every chart follows its box at once, by a redraw at the new width (one per frame at most).
    const follow = (w: number) => {
      if (Math.round(w) === drawnWidth) return;
      drawnWidth = Math.round(w);
      cancelAnimationFrame(frame);
      frame = requestAnimationFrame(() => {
        for (const chart of this.charts()) void chart.chartInstance()?.updateOptions({ chart: { width: drawnWidth } }, false, false, false);
      });
    };
    this.destroyRef.onDestroy(() => cancelAnimationFrame(frame));
    const report = (w: number) => {
      follow(w);
      // Steps of 40 px, so a small resize does not reload the trend.
      const width = Math.max(100, Math.floor(w / 40) * 40);
      if (width !== last) {
        last = width;
        this.widthChange.emit(width);
      }
    };
    report(el.clientWidth || 800);
    if (typeof ResizeObserver === 'undefined') return;
    const ro = new ResizeObserver((entries) => report(entries[0]?.contentRect.width ?? el.clientWidth));
    ro.observe(el);
    this.destroyRef.onDestroy(() => ro.disconnect());
  }

  private readonly destroyRef = inject(DestroyRef);
}

/** The x axis and the start/stop marks of one channel's chart (index 0 names the marks in words). */
function movingOptions(moving: Moving, index: number, ink: (typeof INK)['light']): { xaxis: ApexXAxis; annotations: { xaxis: XAxisAnnotations[] } } {
  const { win, changes, zone } = moving;
  const span = win.to - win.from;
  return {
    // apexcharts writes datetime ticks in the browser's zone; the formatter writes them in the page's zone
    // (with a formatter the ticks are evenly spaced across the window rather than on round hours)
    xaxis: {
      type: 'datetime',
      min: win.from,
      max: win.to,
      tickAmount: 6,
      tooltip: { enabled: false },
      labels: { datetimeUTC: false, hideOverlappingLabels: true, formatter: (v: string | number) => trendAxisLabel(Number(v), span, zone) },
    },
    annotations: {
      xaxis: changes
        .filter((c) => c.t >= win.from && c.t <= win.to)
        .map((c) => ({
          x: c.t,
          borderColor: ink.mark,
          strokeDashArray: c.kind === 'stop' ? 4 : 0,
          // Words only above the top chart, starts and stops on two lines, so close pairs stay readable.
          label:
            index === 0
              ? {
                  text: c.kind === 'start' ? '▲ started' : '▼ stopped',
                  orientation: 'horizontal',
                  position: 'top',
                  textAnchor: c.kind === 'start' ? 'end' : 'start',
                  offsetY: c.kind === 'start' ? -2 : 12,
                  borderWidth: 0,
                  style: { background: 'transparent', color: ink.mark, fontSize: '11px' },
                }
              : { text: '' },
        })) as XAxisAnnotations[],
    },
  };
}

/** The bands a channel is judged by: while running, and while stopped when the engine has a band for that. */
function bandAnnotations(channel: ChannelKey, engine: BandEngine | null): { band: NormalBand; text: string }[] {
  const running = normalBand(channel, 'running', engine ?? {});
  const stopped = normalBand(channel, 'stopped', engine ?? {});
  if (running && stopped && running.low === stopped.low && running.high === stopped.high) return [{ band: running, text: 'normal band' }];
  const out: { band: NormalBand; text: string }[] = [];
  if (running) out.push({ band: running, text: 'normal while running' });
  if (stopped) out.push({ band: stopped, text: 'normal while stopped' });
  return out;
}

const NICE = [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8];

/**
 * An axis from lo to hi rounded out to exactly four steps of 1, 1.5, 2, 2.5, 3, 4, 5, 6 or 8 × 10^n, so the ticks read
 * as round numbers; it does not go below zero for data that does not.
 */
export function niceExtent(lo: number, hi: number): { lo: number; hi: number } {
  const span = Math.max(hi - lo, Math.abs(hi) * 0.02, 1e-6);
  let exp = Math.floor(Math.log10(span / 4));
  let k = 0;
  for (;;) {
    const step = NICE[k] * 10 ** exp;
    let nlo = Math.floor(lo / step + 1e-9) * step;
    if (lo >= 0 && nlo < 0) nlo = 0;
    if (nlo + 4 * step >= hi - 1e-9) return { lo: round6(nlo), hi: round6(nlo + 4 * step) };
    if (++k === NICE.length) {
      k = 0;
      exp++;
    }
  }
}

const round6 = (v: number) => Math.round(v * 1e6) / 1e6;
