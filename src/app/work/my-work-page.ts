import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { WorkApi, errorText } from './work-api';
import { PRIORITY_TEXT, STATUS_ICON, STATUS_TEXT, formatDate, todayIso } from './work-labels';
import { WorkOrderSummary } from './work-types';

/** The technician's own open work, big and touch-friendly for a tablet: in progress first, then by due date. */
@Component({
  selector: 'jw-my-work-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatCardModule, MatIconModule, MatProgressBarModule, RouterLink],
  template: `
    <div class="page">
      <h1>My work</h1>
      @if (loading()) {
        <mat-progress-bar mode="indeterminate" />
      }
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
      @if (!loading() && !sorted().length && !error()) {
        <div class="empty" role="status">
          <p><strong>Nothing assigned to you right now.</strong></p>
          <p>Work the planner gives you appears here, in progress first. Meanwhile:</p>
          <div class="next">
            <a mat-stroked-button routerLink="/due"><mat-icon fontIcon="event_upcoming" />See what is due</a>
            <a mat-stroked-button routerLink="/work/new"><mat-icon fontIcon="add" />Raise a work request</a>
          </div>
        </div>
      }
      <div class="cards">
        @for (o of sorted(); track o.id) {
          <a class="card-link" [routerLink]="['/work', o.id]" [attr.aria-label]="'Work order ' + o.id + ': ' + o.title">
            <mat-card appearance="outlined" [class.active]="o.status === 'in-progress'">
              <mat-card-content>
                <div class="top">
                  <span class="status"><mat-icon [fontIcon]="statusIcon[o.status]" aria-hidden="true" />{{ statusText[o.status] }}</span>
                  <span class="due" [class.late]="late(o)"
                    >Due {{ fmtDate(o.dueDate) }}
                    @if (late(o)) {
                      · overdue
                    }
                  </span>
                </div>
                <div class="title">#{{ o.id }} {{ o.title }}</div>
                <div class="where"><mat-icon fontIcon="place" aria-hidden="true" />{{ o.siteName }} · {{ o.engineName }}</div>
                <div class="bottom">
                  <span>{{ priorityText[o.priority] }} priority</span>
                  <span class="jw-num">{{ o.stepsDone }} of {{ o.stepsTotal }} steps</span>
                </div>
              </mat-card-content>
            </mat-card>
          </a>
        }
      </div>
    </div>
  `,
  styles: `
    .page {
      padding: 16px 24px 32px;
      max-width: 900px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
    }
    .cards {
      display: grid;
      gap: 12px;
    }
    .card-link {
      text-decoration: none;
      color: inherit;
      display: block;
    }
    mat-card {
      min-height: 120px;
    }
    mat-card.active {
      border-left: 6px solid var(--mat-sys-primary);
    }
    .top,
    .bottom {
      display: flex;
      justify-content: space-between;
      gap: 8px;
      font: var(--mat-sys-body-large);
    }
    .status {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      font-weight: 600;
    }
    .title {
      font: var(--mat-sys-title-large);
      margin: 10px 0 6px;
    }
    .where {
      display: flex;
      align-items: center;
      gap: 4px;
      color: var(--jw-muted-text);
      margin-bottom: 8px;
      font: var(--mat-sys-body-large);
    }
    .late {
      color: var(--jw-warning);
      font-weight: 700;
    }
    .error {
      color: var(--jw-alarm-high);
    }
    .empty {
      color: var(--jw-muted-text);
      font: var(--mat-sys-body-large);
    }
    .empty p {
      margin: 0 0 8px;
    }
    .next {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
    }
  `,
})
export class MyWorkPage {
  private readonly api = inject(WorkApi);
  protected readonly orders = signal<WorkOrderSummary[]>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly statusText = STATUS_TEXT;
  protected readonly statusIcon = STATUS_ICON;
  protected readonly priorityText = PRIORITY_TEXT;
  protected readonly fmtDate = formatDate;
  private readonly today = todayIso();
  protected readonly sorted = computed(() => {
    const rank = (s: string) => (s === 'in-progress' ? 0 : s === 'planned' ? 1 : 2);
    return [...this.orders()].sort((a, b) => rank(a.status) - rank(b.status) || (a.dueDate ?? '9999').localeCompare(b.dueDate ?? '9999'));
  });

  constructor() {
    this.api.list({ mine: true, status: ['planned', 'in-progress', 'waiting-sign-off'] }).subscribe({
      next: (o) => {
        this.orders.set(o);
        this.loading.set(false);
      },
      error: (e) => {
        this.error.set(errorText(e));
        this.loading.set(false);
      },
    });
  }

  protected late(o: WorkOrderSummary): boolean {
    return !!o.dueDate && o.dueDate < this.today && o.status !== 'waiting-sign-off';
  }
}
