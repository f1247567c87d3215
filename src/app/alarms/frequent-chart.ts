import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { ApexAxisChartSeries, ApexChart, ApexPlotOptions, ApexXAxis, ApexYAxis, ChartComponent } from 'ng-apexcharts';
import { PreferencesService } from '../core/preferences.service';

/** Horizontal bars: how often each of the most frequent alarms was raised. Neutral grey: a count is not an abnormal state. */
@Component({
  selector: 'jw-frequent-chart',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ChartComponent],
  template: `
    <apx-chart
      [chart]="chart()"
      [series]="series()"
      [xaxis]="xaxis()"
      [plotOptions]="plot"
      [colors]="colors()"
      [yaxis]="yaxis"
      [dataLabels]="{ enabled: true }"
      [legend]="{ show: false }"
      [theme]="{ mode: dark() ? 'dark' : 'light' }"
    />
  `,
})
export class FrequentChart {
  private readonly prefs = inject(PreferencesService);
  readonly items = input.required<{ key: string; count: number }[]>();

  protected readonly dark = this.prefs.dark;
  protected readonly plot: ApexPlotOptions = { bar: { horizontal: true, barHeight: '70%' } };
  protected readonly colors = computed(() => [this.dark() ? '#aab3b9' : '#5f686e']);
  protected readonly chart = computed<ApexChart>(() => ({
    type: 'bar',
    height: Math.max(160, 36 * this.items().length + 60),
    toolbar: { show: false },
    animations: { enabled: false },
    background: 'transparent',
    fontFamily: 'Roboto Condensed, sans-serif',
  }));
  protected readonly series = computed<ApexAxisChartSeries>(() => [{ name: 'Times raised', data: this.items().map((i) => i.count) }]);
  /** Names are "engine · rule": room for them, or two rules of one engine read the same. */
  protected readonly yaxis: ApexYAxis = { labels: { maxWidth: 320 } };
  /** Counts are whole numbers: one tick per count up to 10, never fractions. */
  protected readonly xaxis = computed<ApexXAxis>(() => ({
    categories: this.items().map((i) => i.key),
    title: { text: 'times raised' },
    tickAmount: Math.max(1, Math.min(10, ...this.items().map((i) => i.count))),
    decimalsInFloat: 0,
  }));
}
