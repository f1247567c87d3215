import { CreateWorkData, CreateWorkDialog } from '../work/create-work-dialog';
import { WorkOrderDetail } from '../work/work-types';
import { DisplayZone } from '../core/display-zone';
import { JwTimePipe } from '../ui/time-format';
import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, linkedSignal, signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import { catchError, of, switchMap } from 'rxjs';
import { AuthService } from '../core/auth.service';
import { EngineService } from '../engine/engine.service';
import { CoolantService } from './coolant.service';
import { DueEntry, DueListPageResponse } from './coolant-types';
import { LIST_PAGE_SIZE, LIST_PAGE_SIZES } from '../core/list-page';
import { RunHoursDialog, type RunHoursDialogData } from './run-hours-dialog';

/** The planner's due list: per site, overdue then due soon, with one click to a work order from the task's template. */
@Component({
  selector: 'jw-due-list-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [JwTimePipe, RouterLink, MatButtonModule, MatButtonToggleModule, MatFormFieldModule, MatIconModule, MatPaginatorModule, MatSelectModule],
  template: `
    <h1>Service due</h1>
    <p class="lead">
      Tasks of each engine's service plan that are overdue or due soon, by run hours or calendar, whichever comes first. Intervals are defaults of common
      practice until set from the engine maker's schedule.
    </p>
    <div class="filters">
      <mat-form-field>
        <mat-label>Site</mat-label>
        <mat-select [value]="siteId()" (selectionChange)="siteId.set($event.value)">
          <mat-option [value]="0">All sites</mat-option>
          @for (s of sites(); track s.id) {
            <mat-option [value]="s.id">{{ s.name }}</mat-option>
          }
        </mat-select>
      </mat-form-field>
      <mat-button-toggle-group [value]="windowDays()" (change)="windowDays.set($event.value)" aria-label="Due soon means within">
        <mat-button-toggle [value]="7">7 days</mat-button-toggle>
        <mat-button-toggle [value]="14">14 days</mat-button-toggle>
        <mat-button-toggle [value]="30">30 days</mat-button-toggle>
      </mat-button-toggle-group>
      <span class="hint">or 50 run hours</span>
    </div>
    @if (error()) {
      <p class="error" role="alert">{{ error() }}</p>
    }
    @if (list(); as l) {
      @for (s of l.sites; track s.siteId) {
        <section class="site" [attr.aria-label]="s.siteName">
          <h2>
            {{ s.siteName }} <span class="counts">{{ s.overdue }} overdue · {{ s.dueSoon }} due soon</span>
          </h2>
          @if (s.entries.length < s.entryTotal) {
            <p class="part">{{ s.entries.length }} of this site's {{ s.entryTotal }} tasks on this page</p>
          }
          @if (s.entries.length) {
            <div class="table-wrap">
              <table class="due">
                <thead>
                  <tr>
                    <th>State</th>
                    <th>Engine</th>
                    <th>Task</th>
                    <th>Why</th>
                    <th>Last done</th>
                    <th><span class="jw-visually-hidden">Actions</span></th>
                  </tr>
                </thead>
                <tbody>
                  @for (e of s.entries; track e.engineId + e.taskKey) {
                    <tr [class.overdue]="e.state === 'overdue'" [class.soon]="e.state === 'due-soon'">
                      <td class="state">
                        <mat-icon aria-hidden="true" [fontIcon]="e.state === 'overdue' ? 'error_outline' : 'schedule'" />{{
                          e.state === 'overdue' ? 'Overdue' : 'Due soon'
                        }}
                      </td>
                      <td class="engine">
                        <a [routerLink]="['/engines', e.engineId]">{{ e.engineName }}</a><br /><span class="sub">{{ e.runHours.toFixed(1) }} h</span>
                        @if (canCorrect()) {
                          <button mat-button type="button" class="hours" (click)="correctHours(e)" [attr.aria-label]="'Correct hours of ' + e.engineName">
                            Correct hours
                          </button>
                        }
                      </td>
                      <td>
                        {{ e.title }}
                        @if (e.placeholder) {
                          <br /><span class="sub">placeholder interval: set the maker's figure</span>
                        }
                      </td>
                      <td class="reason">{{ e.reason }}</td>
                      <td>
                        <span class="nowrap jw-num">{{ e.lastDoneAt ? (e.lastDoneAt | jwTime: zones.zoneFor(s.timeZone) : 'date') : 'never recorded' }}</span>
                        @if (e.lastDoneRunHours !== null) {
                          <br /><span class="sub">at {{ e.lastDoneRunHours.toFixed(0) }} h</span>
                        }
                      </td>
                      <td class="act">
                        @if (e.openWorkOrderId) {
                          <a mat-stroked-button [routerLink]="['/work', e.openWorkOrderId]">Open work order #{{ e.openWorkOrderId }}</a>
                        } @else if (canCreate()) {
                          <button mat-flat-button type="button" (click)="create(e)">Create work order</button>
                        }
                        @if (!e.openWorkOrderId && created()[key(e)]; as id) {
                          <a [routerLink]="['/work', id]">Work order #{{ id }} created</a>
                        }
                      </td>
                    </tr>
                  }
                </tbody>
              </table>
            </div>
          } @else {
            <p class="none">
              <mat-icon aria-hidden="true" fontIcon="check" /> Nothing due at this site within {{ windowDays() }} days or 50 run hours.
              @if (windowDays() < 30) {
                <button mat-button type="button" (click)="windowDays.set(30)">Look 30 days ahead</button>
              } @else {
                Next: check the plan intervals on each engine's page, or record a coolant test when one is due by the calendar.
              }
            </p>
          }
        </section>
      } @empty {
        <p class="none">
          No engines to plan for here.
          @if (siteId()) {
            <button mat-button type="button" (click)="siteId.set(0)">Show all sites</button>
          } @else {
            An administrator adds engines under Administration, Engines; their service plan then fills this list.
          }
        </p>
      }
      @if (l.total > 0) {
        <mat-paginator
          [length]="l.total"
          [pageIndex]="l.offset / pageSize()"
          [pageSize]="pageSize()"
          [pageSizeOptions]="pageSizes"
          (page)="onPage($event)"
          aria-label="Pages of the due list"
        />
      }
    } @else {
      <p>Loading…</p>
    }
  `,
  styles: `
    .nowrap {
      white-space: nowrap;
    }
    :host {
      display: block;
      max-width: 1300px;
      padding: 16px 24px 32px;
      box-sizing: border-box;
    }
    .table-wrap {
      overflow-x: auto;
    }
    h1 {
      margin: 0 0 4px;
      font-size: 1.5rem;
    }
    .lead,
    .hint,
    .sub,
    .none,
    .counts {
      color: var(--jw-muted-text);
    }
    .sub {
      font-size: 0.8rem;
    }
    .counts {
      font-size: 0.9rem;
      font-weight: normal;
      margin-left: 8px;
    }
    .filters {
      display: flex;
      align-items: center;
      gap: 12px;
      flex-wrap: wrap;
    }
    h2 {
      font-size: 1.15rem;
      margin: 16px 0 4px;
    }
    .due {
      width: 100%;
      border-collapse: collapse;
    }
    .due th {
      text-align: left;
      font-weight: 600;
      color: var(--jw-muted-text);
      font-size: 0.85rem;
      border-bottom: 1px solid var(--jw-band);
      padding: 6px;
    }
    .due td {
      border-bottom: 1px solid var(--jw-band);
      padding: 6px;
      vertical-align: top;
    }
    .state {
      white-space: nowrap;
      font-weight: 600;
    }
    .state mat-icon {
      vertical-align: middle;
      margin-right: 4px;
      font-size: 20px;
      height: 20px;
      width: 20px;
    }
    tr.overdue .state {
      color: var(--jw-alarm-high);
    }
    tr.soon .state {
      color: var(--jw-warning);
    }
    .reason {
      font-size: 0.9rem;
      max-width: 380px;
    }
    .act {
      min-width: 170px;
    }
    .engine {
      min-width: 150px;
    }
    .engine a {
      white-space: nowrap;
    }
    .hours {
      display: block;
      font-size: 0.8rem;
      min-height: 28px;
      height: 28px;
      padding: 0 6px;
      margin-left: -6px;
    }
    .act a:not(.mat-mdc-button-base) {
      display: block;
      margin-top: 4px;
    }
    .error {
      color: var(--jw-alarm-high);
    }
    .part {
      color: var(--jw-muted-text);
      font-size: 0.85rem;
      margin: 0 0 4px;
    }
  `,
})
export class DueListPage {
  protected readonly zones = inject(DisplayZone);
  private readonly api = inject(CoolantService);
  private readonly auth = inject(AuthService);
  protected readonly sites = toSignal(
    inject(EngineService)
      .sites()
      .pipe(catchError(() => of([]))),
    { initialValue: [] },
  );
  readonly siteId = signal(0);
  readonly windowDays = signal(14);
  private readonly reload = signal(0);
  /** The list is computed and paged on the server; a new site or window starts at the first page. */
  protected readonly pageSize = signal(LIST_PAGE_SIZE);
  protected readonly pageSizes = LIST_PAGE_SIZES;
  protected readonly offset = linkedSignal<unknown, number>({ source: () => [this.siteId(), this.windowDays(), this.pageSize()], computation: () => 0 });
  protected readonly error = signal<string | null>(null);
  protected readonly busy = signal<string | null>(null);
  protected readonly created = signal<Record<string, number>>({});
  protected readonly canCreate = computed(() => this.auth.hasRole('planner', 'admin', 'technician'));
  protected readonly canCorrect = computed(() => this.auth.hasRole('planner', 'admin'));
  private readonly dialog = inject(MatDialog);
  protected readonly list = toSignal(
    toObservable(
      computed(() => ({ siteId: this.siteId(), windowDays: this.windowDays(), offset: this.offset(), limit: this.pageSize(), n: this.reload() })),
    ).pipe(
      switchMap((q) =>
        this.api.dueListPage({ siteId: q.siteId || undefined, windowDays: q.windowDays, offset: q.offset, limit: q.limit }).pipe(
          catchError((e) => {
            this.error.set(e instanceof HttpErrorResponse ? (e.error?.error ?? e.message) : String(e));
            return of(null as DueListPageResponse | null);
          }),
        ),
      ),
    ),
    { initialValue: null as DueListPageResponse | null },
  );
  protected readonly key = (e: DueEntry) => `${e.engineId}:${e.taskKey}`;

  protected onPage(e: PageEvent): void {
    if (e.pageSize !== this.pageSize()) return this.pageSize.set(e.pageSize);
    this.offset.set(e.pageIndex * e.pageSize);
  }

  /** Run hours from the hour meter, with a reason (audited); the list is recomputed with the new hours. */
  protected correctHours(e: DueEntry): void {
    const data: RunHoursDialogData = { engineId: e.engineId, engineName: e.engineName, runHours: e.runHours };
    this.dialog
      .open(RunHoursDialog, { data, width: '560px' })
      .afterClosed()
      .subscribe((changed) => {
        if (changed !== undefined) this.reload.update((n) => n + 1);
      });
  }

  /** Opens the short dialog (kind suggested by the task, assignee, due date) before anything is created. */
  protected create(e: DueEntry): void {
    const data: CreateWorkData = {
      engineId: e.engineId,
      engineName: e.engineName,
      kind: e.workKind ?? 'general-repair',
      serviceTaskKey: e.taskKey,
      title: `${e.title}: ${e.engineName}`,
      from: `Due task: ${e.title} (${e.reason})`,
    };
    this.error.set(null);
    this.dialog
      .open<CreateWorkDialog, CreateWorkData, WorkOrderDetail>(CreateWorkDialog, { data, width: '520px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((wo) => {
        if (!wo) return;
        this.created.update((c) => ({ ...c, [this.key(e)]: wo.id }));
        this.reload.update((n) => n + 1);
      });
  }
}
