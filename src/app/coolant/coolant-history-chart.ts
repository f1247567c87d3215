import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { ApexAnnotations, ApexAxisChartSeries, ApexChart, ApexXAxis, ApexYAxis, ChartComponent } from 'ng-apexcharts';
import { PreferencesService } from '../core/preferences.service';

export interface HistoryPoint {
  t: number;
  v: number;
}

/** One measured quantity of the coolant tests over time, with its target band shaded. Neutral ink; the band is grey. */
@Component({
  selector: 'jw-coolant-history-chart',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ChartComponent],
  template: `
    <section [attr.aria-label]="title() + ' over time' + (unit() ? ', in ' + unit() : '')">
      <h3>
        {{ title() }} <span class="unit">{{ unit() }}</span>
      </h3>
      @if (points().length) {
        <apx-chart
          [chart]="chart"
          [series]="series()"
          [xaxis]="xaxis"
          [yaxis]="yaxis()"
          [annotations]="annotations()"
          [stroke]="stroke"
          [markers]="markers"
          [colors]="colors()"
          [dataLabels]="{ enabled: false }"
          [legend]="{ show: false }"
          [theme]="theme()"
          [grid]="grid()"
        />
        <p class="band">{{ bandText() }}</p>
      } @else {
        <p class="none">No {{ title().toLowerCase() }} recorded yet.</p>
      }
    </section>
  `,
  styles: `
    h3 {
      font-size: 0.95rem;
      margin: 8px 0 0;
    }
    .unit,
    .band,
    .none {
      color: var(--jw-muted-text);
      font-size: 0.8rem;
      font-weight: normal;
    }
    .band {
      margin: 0 0 8px;
    }
  `,
})
export class CoolantHistoryChart {
  private readonly prefs = inject(PreferencesService);
  readonly title = input.required<string>();
  readonly unit = input.required<string>();
  readonly points = input.required<HistoryPoint[]>();
  readonly band = input<{ low: number; high: number; source: string } | null>(null);
  readonly decimals = input(1);

  protected readonly chart: ApexChart = {
    type: 'line',
    height: 170,
    animations: { enabled: false },
    toolbar: { show: false },
    zoom: { enabled: false },
    background: 'transparent',
  };
  protected readonly xaxis: ApexXAxis = { type: 'datetime', labels: { datetimeUTC: false } };
  protected readonly stroke = { width: 2, curve: 'straight' as const };
  protected readonly markers = { size: 4, shape: 'square' as const };
  protected readonly theme = computed(() => ({ mode: this.prefs.dark() ? ('dark' as const) : ('light' as const) }));
  protected readonly colors = computed(() => [this.prefs.dark() ? '#dde1e4' : '#3b4247']);
  protected readonly grid = computed(() => ({ borderColor: this.prefs.dark() ? '#3a3d40' : '#e0e3e5' }));
  protected readonly series = computed<ApexAxisChartSeries>(() => [{ name: this.title(), data: this.points().map((p) => ({ x: p.t, y: p.v })) }]);
  protected readonly yaxis = computed<ApexYAxis>(() => {
    const vs = this.points().map((p) => p.v);
    const b = this.band();
    const lo = Math.min(...vs, ...(b ? [b.low] : []));
    const hi = Math.max(...vs, ...(b ? [b.high] : []));
    const pad = Math.max((hi - lo) * 0.1, 0.1);
    const d = this.decimals();
    return { min: lo - pad, max: hi + pad, labels: { formatter: (v: number) => v.toFixed(d) } };
  });
  protected readonly annotations = computed<ApexAnnotations>(() => {
    const b = this.band();
    if (!b) return {};
    return { yaxis: [{ y: b.low, y2: b.high, fillColor: this.prefs.dark() ? '#6b7379' : '#9aa3aa', opacity: 0.2, borderColor: 'transparent' }] };
  });
  protected readonly bandText = computed(() => {
    const b = this.band();
    const d = this.decimals();
    return b
      ? `Shaded: target ${b.low.toFixed(d)} to ${b.high.toFixed(d)}${this.unit() ? ' ' + this.unit() : ''} (${b.source}).`
      : 'No target band: watch the trend (a steady rise points to contamination).';
  });
}
