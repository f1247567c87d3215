import { DecimalPipe, PercentPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { lastValue } from '../core/last-value';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatCardModule } from '@angular/material/card';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { FrequentChart } from './frequent-chart';
import { formatDuration, formatTime } from './alarm-labels';
import { AlarmPerformance } from './alarm-types';
import { AlarmsApi, errorText } from './alarms-api';

const DAY = 86_400_000;

/** "Works gen-set A/coolant_temp_high" (the report's grouping key) as "Works gen-set A · Coolant temp high". */
export function activationLabel(key: string): string {
  const cut = key.lastIndexOf('/');
  if (cut < 0) return key;
  const rule = key.slice(cut + 1).replace(/_/g, ' ');
  return `${key.slice(0, cut)} · ${rule.charAt(0).toUpperCase()}${rule.slice(1)}`;
}
const SPANS = [
  { days: 1, text: 'Last 24 hours' },
  { days: 7, text: 'Last 7 days' },
  { days: 30, text: 'Last 30 days' },
];

/**
 * How the alarm system behaves (ISA-18.2 performance figures): rate per day and per 10 minutes,
 * the busiest 10 minutes, the most frequent, chattering and standing alarms, time to acknowledge.
 */
@Component({
  selector: 'jw-performance-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonToggleModule, MatCardModule, MatTableModule, MatProgressBarModule, DecimalPipe, PercentPipe, FrequentChart],
  template: `
    <section class="page">
      <h1>Alarm performance</h1>
      <mat-button-toggle-group [value]="days()" (change)="days.set($event.value)" aria-label="Period" hideSingleSelectionIndicator>
        @for (s of spans; track s.days) {
          <mat-button-toggle [value]="s.days">{{ s.text }}</mat-button-toggle>
        }
      </mat-button-toggle-group>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading" />
      }
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
      @if (report(); as r) {
        <p class="period">{{ time(r.from) }} to {{ time(r.to) }}</p>
        <div class="figures jw-num">
          <mat-card appearance="outlined"
            ><span class="big">{{ r.total }}</span
            ><span>alarms raised</span></mat-card
          >
          <mat-card appearance="outlined"
            ><span class="big">{{ r.perDay | number: '1.0-1' }}</span
            ><span>alarms per day on average</span></mat-card
          >
          <mat-card appearance="outlined"
            ><span class="big">{{ r.per10Min | number: '1.0-2' }}</span
            ><span>alarms per 10 minutes on average</span></mat-card
          >
          <mat-card appearance="outlined"
            ><span class="big">{{ r.max10Min }}</span
            ><span>alarms in the busiest 10 minutes</span></mat-card
          >
          <mat-card appearance="outlined"
            ><span class="big">{{ r.share10MinOver10 | percent: '1.0-1' }}</span
            ><span>of 10-minute periods with more than 10 alarms (flood level)</span></mat-card
          >
          <mat-card appearance="outlined">
            <span class="big">{{ r.acknowledge.medianMs === null ? '—' : duration(r.acknowledge.medianMs) }}</span>
            <span
              >median time to acknowledge (mean {{ r.acknowledge.meanMs === null ? '—' : duration(r.acknowledge.meanMs) }};
              {{ r.acknowledge.unacknowledged }} not acknowledged)</span
            >
          </mat-card>
        </div>

        <h2>Most frequent</h2>
        @if (r.mostFrequent.length) {
          @defer (on viewport) {
            <jw-frequent-chart [items]="frequent()" />
          } @placeholder {
            <div class="chart-space"></div>
          }
          <table mat-table [dataSource]="r.mostFrequent">
            <ng-container matColumnDef="key"
              ><th mat-header-cell *matHeaderCellDef>Engine / rule</th>
              <td mat-cell *matCellDef="let x">{{ label(x.key) }}</td></ng-container
            >
            <ng-container matColumnDef="count"
              ><th mat-header-cell *matHeaderCellDef>Times raised</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ x.count }}</td></ng-container
            >
            <ng-container matColumnDef="share"
              ><th mat-header-cell *matHeaderCellDef>Share of all</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ x.share | percent: '1.0-1' }}</td></ng-container
            >
            <tr mat-header-row *matHeaderRowDef="['key', 'count', 'share']"></tr>
            <tr mat-row *matRowDef="let row; columns: ['key', 'count', 'share']"></tr>
          </table>
        } @else {
          <p class="muted">No alarms in this period.</p>
        }

        <h2>Chattering</h2>
        <p class="muted">
          Came into alarm {{ r.chatter.count }} or more times within {{ windowText(r.chatter.windowMs) }} (a common working threshold, not a figure of the
          standard).
        </p>
        <p class="advice">
          Chattering alarms are candidates for a longer deadband or on-/off-delay on their rule (or for a check of the sensor): each return to alarm asks for
          attention that the process does not need.
        </p>
        @if (r.chattering.length) {
          <table mat-table [dataSource]="r.chattering">
            <ng-container matColumnDef="key"
              ><th mat-header-cell *matHeaderCellDef>Engine / rule</th>
              <td mat-cell *matCellDef="let x">{{ label(x.key) }}</td></ng-container
            >
            <ng-container matColumnDef="bursts"
              ><th mat-header-cell *matHeaderCellDef>Bursts</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ x.bursts }}</td></ng-container
            >
            <ng-container matColumnDef="max"
              ><th mat-header-cell *matHeaderCellDef>Most in one window</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ x.maxInWindow }}</td></ng-container
            >
            <tr mat-header-row *matHeaderRowDef="['key', 'bursts', 'max']"></tr>
            <tr mat-row *matRowDef="let row; columns: ['key', 'bursts', 'max']"></tr>
          </table>
        } @else {
          <p class="muted" data-testid="no-chattering">None found.</p>
        }

        <h2>Standing</h2>
        <p class="muted">Active for more than 24 hours (a common working threshold).</p>
        @if (r.standing.length) {
          <table mat-table [dataSource]="r.standing">
            <ng-container matColumnDef="key"
              ><th mat-header-cell *matHeaderCellDef>Engine / rule</th>
              <td mat-cell *matCellDef="let x">{{ label(x.key) }}</td></ng-container
            >
            <ng-container matColumnDef="since"
              ><th mat-header-cell *matHeaderCellDef>Active since</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ time(x.activatedAt) }}</td></ng-container
            >
            <ng-container matColumnDef="for"
              ><th mat-header-cell *matHeaderCellDef>For</th>
              <td mat-cell *matCellDef="let x" class="jw-num">{{ duration(x.activeMs) }}</td></ng-container
            >
            <tr mat-header-row *matHeaderRowDef="['key', 'since', 'for']"></tr>
            <tr mat-row *matRowDef="let row; columns: ['key', 'since', 'for']"></tr>
          </table>
        } @else {
          <p class="muted">None.</p>
        }
      }
    </section>
  `,
  styles: `
    .page {
      padding: 16px 24px 32px;
      max-width: 1200px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
      margin: 0 0 12px;
    }
    h2 {
      font: var(--mat-sys-title-medium);
      margin: 24px 0 4px;
    }
    .period,
    .muted {
      color: var(--jw-muted-text);
    }
    .figures {
      display: grid;
      grid-template-columns: repeat(auto-fill, minmax(13em, 1fr));
      gap: 12px;
    }
    .figures mat-card {
      padding: 12px 16px;
      display: flex;
      flex-direction: column;
      gap: 2px;
    }
    .big {
      font: var(--mat-sys-headline-medium);
      font-weight: 700;
    }
    .chart-space {
      height: 200px;
    }
    table {
      width: 100%;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class PerformancePage {
  private readonly api = inject(AlarmsApi);
  protected readonly spans = SPANS;
  protected readonly days = signal(7);
  /** A new span asks again (and cancels the request still loading); the last report stays in view meanwhile. */
  private readonly figures = rxResource({
    params: () => this.days(),
    stream: ({ params: days }) => {
      const to = Date.now();
      return this.api.performance(to - days * DAY, to);
    },
  });
  protected readonly report = lastValue<AlarmPerformance | null>(this.figures, null);
  protected readonly loading = this.figures.isLoading;
  protected readonly error = computed(() => {
    const err = this.figures.error();
    return err ? errorText(err, 'The figures could not be loaded') : null;
  });
  /** The chart's bars, named once per report (a new array each check would redraw the chart). */
  protected readonly frequent = computed(() => (this.report()?.mostFrequent ?? []).map((i) => ({ ...i, key: activationLabel(i.key) })));

  protected time(t: number): string {
    return formatTime(t);
  }
  protected label(key: string): string {
    return activationLabel(key);
  }
  protected duration(ms: number): string {
    return formatDuration(ms);
  }
  protected windowText(ms: number): string {
    const s = Math.round(ms / 1000);
    return s % 60 === 0 ? `${s / 60} min` : `${s} s`;
  }
}
