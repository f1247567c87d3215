import { firstValueFrom } from 'rxjs';
import { DOCUMENT } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth.service';
import { downloadText } from '../engine/readings-csv';
import { WorkApi, errorText } from './work-api';
import { WorkListApi } from './work-list-api';
import { LIST_PAGE_SIZE, LIST_PAGE_SIZES, ListPage } from '../core/list-page';
import { lastValue } from '../core/last-value';
import { workOrdersToCsv } from './work-csv';
import { OPEN_STATUSES, PRIORITY_TEXT, STATUSES, STATUS_ICON, STATUS_TEXT, formatDate, todayIso, weekStart } from './work-labels';
import { Assignee, WorkOrderSummary, WorkStatus } from './work-types';

interface WeekGroup {
  key: string;
  label: string;
  overdue: boolean;
  orders: WorkOrderSummary[];
}

/** The planner's view of all work: filters, a due-week timeline (one table per week), CSV export. */
@Component({
  selector: 'jw-work-list-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTableModule,
    RouterLink,
  ],
  template: `
    <div class="page">
      <header class="head">
        <h1>Work</h1>
        <span class="spacer"></span>
        <button mat-stroked-button type="button" (click)="exportCsv()" [disabled]="!orders().length || exporting()">
          <mat-icon fontIcon="download" />Export CSV
        </button>
        @if (canCreate()) {
          <a mat-flat-button routerLink="/work/new"><mat-icon fontIcon="add" />New work order</a>
        }
      </header>

      <div class="filters" [formGroup]="filters">
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Status</mat-label>
          <mat-select multiple formControlName="statuses" (selectionChange)="reload(0)">
            @for (s of allStatuses; track s) {
              <mat-option [value]="s">{{ statusText[s] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Site</mat-label>
          <mat-select formControlName="siteId" (selectionChange)="reload(0)">
            <mat-option [value]="null">All sites</mat-option>
            @for (s of sites(); track s.id) {
              <mat-option [value]="s.id">{{ s.name }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline" subscriptSizing="dynamic">
          <mat-label>Assignee</mat-label>
          <mat-select formControlName="assigneeId" (selectionChange)="reload(0)">
            <mat-option [value]="null">Anyone</mat-option>
            @for (a of assignees(); track a.id) {
              <mat-option [value]="a.id">{{ a.name }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
      </div>

      @if (loading()) {
        <mat-progress-bar mode="indeterminate" />
      }
      @if (error(); as e) {
        <p class="error" role="alert"><mat-icon fontIcon="error" />{{ e }}</p>
      }
      @if (!loading() && !orders().length && !error()) {
        <p class="empty">No work orders match.</p>
      }

      @for (g of groups(); track g.key) {
        <section class="week" [attr.aria-label]="g.label">
          <h2 [class.overdue]="g.overdue">
            @if (g.overdue) {
              <mat-icon fontIcon="schedule" aria-hidden="true" />
            }
            {{ g.label }} <span class="count">· {{ g.orders.length }}</span>
          </h2>
          <table mat-table [dataSource]="g.orders" class="orders">
            <ng-container matColumnDef="due"
              ><th mat-header-cell *matHeaderCellDef>Due</th>
              <td mat-cell *matCellDef="let o" [class.late]="isLate(o)">
                {{ fmtDate(o.dueDate) }}
                @if (isLate(o)) {
                  <span class="tag">overdue</span>
                }
              </td></ng-container
            >
            <ng-container matColumnDef="status"
              ><th mat-header-cell *matHeaderCellDef>Status</th>
              <td mat-cell *matCellDef="let o">
                <span class="status" [attr.data-status]="o.status"
                  ><mat-icon [fontIcon]="statusIcon[o.status]" aria-hidden="true" />{{ statusText[o.status] }}</span
                >
              </td></ng-container
            >
            <ng-container matColumnDef="order"
              ><th mat-header-cell *matHeaderCellDef>Work order</th>
              <td mat-cell *matCellDef="let o">
                <a [routerLink]="['/work', o.id]">#{{ o.id }} {{ o.title }}</a>
                @if (o.manualChecks) {
                  <span class="tag manual"><mat-icon fontIcon="back_hand" aria-hidden="true" />manual check</span>
                }
                @if (o.alarmIds.length) {
                  <span class="tag">from alarm</span>
                }
              </td></ng-container
            >
            <ng-container matColumnDef="engine"
              ><th mat-header-cell *matHeaderCellDef>Site · engine</th>
              <td mat-cell *matCellDef="let o">{{ o.siteName }} · {{ o.engineName }}</td></ng-container
            >
            <ng-container matColumnDef="priority"
              ><th mat-header-cell *matHeaderCellDef>Priority</th>
              <td mat-cell *matCellDef="let o" [class.hi]="o.priority === 'high' || o.priority === 'urgent'">{{ priorityText[o.priority] }}</td></ng-container
            >
            <ng-container matColumnDef="assignee"
              ><th mat-header-cell *matHeaderCellDef>Assignee</th>
              <td mat-cell *matCellDef="let o">{{ o.assigneeName ?? 'not assigned' }}</td></ng-container
            >
            <ng-container matColumnDef="progress"
              ><th mat-header-cell *matHeaderCellDef>Steps</th>
              <td mat-cell *matCellDef="let o" class="jw-num">{{ o.stepsDone }} / {{ o.stepsTotal }}</td></ng-container
            >
            <tr mat-header-row *matHeaderRowDef="columns"></tr>
            <tr mat-row *matRowDef="let row; columns: columns"></tr>
          </table>
        </section>
      }
      @if (total() > 0) {
        <mat-paginator
          [length]="total()"
          [pageIndex]="offset() / pageSize()"
          [pageSize]="pageSize()"
          [pageSizeOptions]="pageSizes"
          (page)="onPage($event)"
          aria-label="Pages of work orders"
        />
      }
    </div>
  `,
  styles: `
    .page {
      padding: 16px 24px;
      max-width: 1400px;
    }
    .head {
      display: flex;
      align-items: center;
      gap: 8px;
      flex-wrap: wrap;
    }
    .head h1 {
      font: var(--mat-sys-headline-small);
      margin: 0;
    }
    .spacer {
      flex: 1;
    }
    .filters {
      display: flex;
      gap: 12px;
      flex-wrap: wrap;
      margin: 16px 0;
    }
    .filters mat-form-field {
      width: 220px;
    }
    .week h2 {
      font: var(--mat-sys-title-medium);
      margin: 20px 0 6px;
      display: flex;
      align-items: center;
      gap: 6px;
    }
    .week h2.overdue {
      color: var(--jw-warning);
    }
    .count {
      color: var(--jw-muted-text);
      font-weight: 400;
    }
    table.orders {
      width: 100%;
    }
    .status {
      display: inline-flex;
      align-items: center;
      gap: 4px;
    }
    .status mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    .tag {
      display: inline-flex;
      align-items: center;
      gap: 2px;
      margin-left: 6px;
      padding: 0 6px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 4px;
      font: var(--mat-sys-label-small);
    }
    .tag.manual {
      color: var(--jw-warning);
      background: var(--jw-warning-bg);
      border-color: var(--jw-warning);
    }
    .tag.manual mat-icon {
      font-size: 14px;
      width: 14px;
      height: 14px;
    }
    .late {
      color: var(--jw-warning);
      font-weight: 600;
    }
    .hi {
      font-weight: 700;
    }
    .error {
      color: var(--jw-alarm-high);
      display: flex;
      gap: 6px;
      align-items: center;
    }
    .empty {
      color: var(--jw-muted-text);
    }
  `,
})
export class WorkListPage {
  private readonly api = inject(WorkApi);
  private readonly listApi = inject(WorkListApi);
  private readonly auth = inject(AuthService);
  private readonly doc = inject(DOCUMENT);

  protected readonly allStatuses = STATUSES;
  protected readonly statusText: Record<string, string> = STATUS_TEXT;
  protected readonly statusIcon: Record<string, string> = STATUS_ICON;
  protected readonly priorityText: Record<string, string> = PRIORITY_TEXT;
  protected readonly columns = ['due', 'status', 'order', 'engine', 'priority', 'assignee', 'progress'];
  protected readonly fmtDate = formatDate;

  private readonly fb = inject(NonNullableFormBuilder);
  /** The list's filters; a change asks the server again (selectionChange, after the control has the value). */
  protected readonly filters = this.fb.group({
    statuses: this.fb.control<WorkStatus[]>([...OPEN_STATUSES]),
    siteId: this.fb.control<number | null>(null),
    assigneeId: this.fb.control<number | null>(null),
  });
  protected readonly pageSize = signal(LIST_PAGE_SIZE);
  protected readonly pageSizes = LIST_PAGE_SIZES;
  /** The page asked for: the filters as they were when asked, its place and size (each reload() is a new request). */
  private readonly query = signal({ filter: this.filter(), offset: 0, limit: LIST_PAGE_SIZE });
  /** Paged on the server; a newer query cancels the one still loading, so the newest request always wins. */
  private readonly page = rxResource({
    params: () => this.query(),
    stream: ({ params: q }) => this.listApi.page(q.filter, q.offset, q.limit),
  });
  /** This page (kept while the next one loads) and the number of orders matching over all pages. */
  private readonly shown = lastValue<ListPage<WorkOrderSummary>>(this.page, { items: [], total: 0, limit: LIST_PAGE_SIZE, offset: 0 });
  protected readonly orders = computed(() => this.shown().items);
  protected readonly total = computed(() => this.shown().total);
  protected readonly offset = computed(() => this.query().offset);
  protected readonly exporting = signal(false);
  protected readonly sites = signal<{ id: number; name: string }[]>([]);
  protected readonly assignees = signal<Assignee[]>([]);
  protected readonly loading = this.page.isLoading;
  private readonly exportError = signal<string | null>(null);
  protected readonly error = computed(() => {
    const err = this.page.error();
    return err ? errorText(err) : this.exportError();
  });
  protected readonly canCreate = computed(() => this.auth.hasRole('planner', 'admin', 'operator', 'technician'));
  private readonly today = todayIso();

  /** Grouped by the week the work is due; overdue open work first, undated last. */
  protected readonly groups = computed<WeekGroup[]>(() => {
    const map = new Map<string, WeekGroup>();
    const thisWeek = weekStart(this.today);
    for (const o of this.orders()) {
      const key = o.dueDate ? weekStart(o.dueDate) : 'none';
      let g = map.get(key);
      if (!g) {
        const overdue = key !== 'none' && key < thisWeek;
        const label =
          key === 'none'
            ? 'No due date'
            : key === thisWeek
              ? `This week (from ${formatDate(key)})`
              : `${overdue ? 'Overdue · ' : ''}Week of ${formatDate(key)}`;
        g = { key, label, overdue, orders: [] };
        map.set(key, g);
      }
      g.orders.push(o);
    }
    return [...map.values()].sort((a, b) => (a.key === 'none' ? 1 : b.key === 'none' ? -1 : a.key.localeCompare(b.key)));
  });

  constructor() {
    this.api.sites().subscribe({ next: (s) => this.sites.set(s), error: () => undefined });
    this.api.assignees().subscribe({ next: (a) => this.assignees.set(a), error: () => undefined });
  }

  protected isLate(o: WorkOrderSummary): boolean {
    return !!o.dueDate && o.dueDate < this.today && OPEN_STATUSES.includes(o.status);
  }

  private filter() {
    const f = this.filters.getRawValue();
    return { status: f.statuses, siteId: f.siteId ?? undefined, assigneeId: f.assigneeId ?? undefined };
  }

  /** Asks the server for one page; a changed filter starts again at the first page (offset 0). */
  protected reload(offset = this.offset()): void {
    this.exportError.set(null);
    this.query.set({ filter: this.filter(), offset, limit: this.pageSize() });
  }

  protected onPage(e: PageEvent): void {
    const sizeChanged = e.pageSize !== this.pageSize();
    this.pageSize.set(e.pageSize);
    this.reload(sizeChanged ? 0 : e.pageIndex * e.pageSize);
  }

  /** The CSV holds every order matching the filters, not only this page. */
  protected async exportCsv(): Promise<void> {
    this.exporting.set(true);
    try {
      downloadText(this.doc, `work-orders-${this.today}.csv`, workOrdersToCsv(await firstValueFrom(this.listApi.all(this.filter()))));
    } catch (e) {
      this.exportError.set(errorText(e));
    } finally {
      this.exporting.set(false);
    }
  }
}
