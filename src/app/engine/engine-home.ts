import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, effect, inject, input, untracked, type ResourceRef, type Signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { priorityLook, stateText } from '../alarms/alarm-labels';
import { AlarmStore } from '../alarms/alarm-store';
import { Alarm } from '../alarms/alarm-types';
import { AlarmsApi } from '../alarms/alarms-api';
import { CoolantTest, DueEntry } from '../coolant/coolant-types';
import { CoolantService } from '../coolant/coolant.service';
import { JwTimePipe } from '../ui/time-format';
import { STATUS_TEXT } from '../work/work-labels';
import { WorkApi } from '../work/work-api';
import { WorkOrderSummary } from '../work/work-types';

/** Recent (closed) alarms listed beside the open ones. */
const RECENT_ALARMS = 5;
const OPEN_WORK = ['requested', 'planned', 'in-progress', 'waiting-sign-off'] as const;
const DUE_WINDOW_DAYS = 30;
const ADDITIVE_TEXT: Record<string, string> = {
  low: 'Additive low',
  'in-range': 'Additive in range',
  high: 'Additive high',
  'not-applicable': 'No strip decision',
};
const DUE_TEXT: Record<DueEntry['state'], string> = { overdue: 'Overdue', 'due-soon': 'Due soon', ok: 'Not due' };

/** One section's load state: its rows, or why they are not there. */
interface Section<T> {
  rows: T[] | null;
  error: string | null;
  /** The role may not see this (403): the section says so instead of failing. */
  hidden?: boolean;
}

const empty = <T>(): Section<T> => ({ rows: null, error: null });

/** A section from its resource: the rows, why they are missing, or hidden from a role that may not see them (403). */
function sectionOf<T>(res: ResourceRef<T[] | undefined>, failure: string): Signal<Section<T>> {
  return computed(() => {
    const err = res.error();
    if (err) return err instanceof HttpErrorResponse && err.status === 403 ? { rows: [], error: null, hidden: true } : { rows: null, error: failure };
    return res.hasValue() ? { rows: res.value() ?? null, error: null } : empty<T>();
  });
}

/**
 * The engine page as the engine's home: its open and recent alarms, due tasks, open work orders and last
 * coolant test with the decision, each linking to its own page. Each part loads and fails on its own.
 */
@Component({
  selector: 'jw-engine-home',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatCardModule, MatIconModule, MatButtonModule, RouterLink, JwTimePipe],
  template: `
    <div class="home">
      <mat-card appearance="outlined" class="card" data-test="engine-alarms">
        <h2>Alarms <a class="more" [routerLink]="['/alarms']" [queryParams]="{ engineId: engineId(), view: 'all' }">all alarms of this engine</a></h2>
        @if (alarms().error; as e) {
          <p class="error" role="alert">{{ e }} <button mat-button type="button" (click)="reload()">Retry</button></p>
        } @else if (alarms().rows; as rows) {
          @if (openAlarms().length === 0) {
            <p class="none"><mat-icon aria-hidden="true" fontIcon="check_circle_outline" />No open alarm.</p>
          }
          <ul class="list">
            @for (a of openAlarms(); track a.id) {
              <li class="open" [attr.data-priority]="a.priority">
                <mat-icon aria-hidden="true" [fontIcon]="look(a).icon" />
                <a [routerLink]="['/alarms', a.id]">{{ a.title }}</a>
                <span class="tag">{{ look(a).text }} · {{ state(a) }}</span>
                <span class="when jw-num">{{ a.raisedAt | jwTime: zone() }}</span>
              </li>
            }
            @for (a of recentAlarms(); track a.id) {
              <li class="closed">
                <mat-icon aria-hidden="true" fontIcon="history" />
                <a [routerLink]="['/alarms', a.id]">{{ a.title }}</a>
                <span class="tag">{{ look(a).text }} · {{ state(a) }}</span>
                <span class="when jw-num">{{ a.raisedAt | jwTime: zone() }}</span>
              </li>
            }
          </ul>
        } @else {
          <p class="none">Loading…</p>
        }
      </mat-card>

      <mat-card appearance="outlined" class="card" data-test="engine-due">
        <h2>Service due <a class="more" routerLink="/due">service due list</a></h2>
        @if (due().error; as e) {
          <p class="error" role="alert">{{ e }} <button mat-button type="button" (click)="reload()">Retry</button></p>
        } @else if (due().rows; as rows) {
          @if (rows.length === 0) {
            <p class="none"><mat-icon aria-hidden="true" fontIcon="event_available" />Nothing due in the next {{ dueDays }} days.</p>
          }
          <ul class="list">
            @for (d of rows; track d.taskKey) {
              <li [class.overdue]="d.state === 'overdue'">
                <mat-icon aria-hidden="true" [fontIcon]="d.state === 'overdue' ? 'event_busy' : 'event_upcoming'" />
                <span>{{ d.title }}</span>
                <span class="tag">{{ dueText(d) }}</span>
                <span class="when">{{ d.reason }}</span>
                @if (d.openWorkOrderId) {
                  <a [routerLink]="['/work', d.openWorkOrderId]">work order #{{ d.openWorkOrderId }}</a>
                }
              </li>
            }
          </ul>
        } @else {
          <p class="none">Loading…</p>
        }
      </mat-card>

      <mat-card appearance="outlined" class="card" data-test="engine-work">
        <h2>Open work orders</h2>
        @if (work().hidden) {
          <p class="none">Work orders are for planners, technicians and administrators.</p>
        } @else if (work().error; as e) {
          <p class="error" role="alert">{{ e }} <button mat-button type="button" (click)="reload()">Retry</button></p>
        } @else if (work().rows; as rows) {
          @if (rows.length === 0) {
            <p class="none"><mat-icon aria-hidden="true" fontIcon="assignment_turned_in" />No open work order.</p>
          }
          <ul class="list">
            @for (w of rows; track w.id) {
              <li>
                <mat-icon aria-hidden="true" fontIcon="assignment" />
                <a [routerLink]="['/work', w.id]">#{{ w.id }} {{ w.title }}</a>
                <span class="tag">{{ statusText(w) }}</span>
                @if (w.dueDate) {
                  <span class="when jw-num">due {{ w.dueDate | jwTime: zone() : 'date' }}</span>
                }
              </li>
            }
          </ul>
        } @else {
          <p class="none">Loading…</p>
        }
      </mat-card>

      <mat-card appearance="outlined" class="card" data-test="engine-coolant-test">
        <h2>Last coolant test <a class="more" [routerLink]="['/engines', engineId(), 'coolant']">coolant of this engine</a></h2>
        @if (tests().error; as e) {
          <p class="error" role="alert">{{ e }} <button mat-button type="button" (click)="reload()">Retry</button></p>
        } @else if (tests().rows) {
          @if (lastTest(); as t) {
            <p>
              <span class="jw-num">{{ t.testedAt | jwTime: zone() : 'date' }}</span>
              @if (t.testedByName) {
                · {{ t.testedByName }}
              }
            </p>
            <p class="decision" [class.abnormal]="abnormalTest()">
              <mat-icon aria-hidden="true" [fontIcon]="abnormalTest() ? 'warning_amber' : 'science'" />{{ decisionText() }}
            </p>
          } @else {
            <p class="none">No coolant test recorded. <a [routerLink]="['/engines', engineId(), 'coolant']">Record one</a></p>
          }
        } @else {
          <p class="none">Loading…</p>
        }
      </mat-card>
    </div>
  `,
  styles: `
    .home {
      display: grid;
      grid-template-columns: repeat(auto-fit, minmax(320px, 1fr));
      gap: 16px;
      margin-bottom: 16px;
    }
    .card {
      padding: 12px 16px;
    }
    h2 {
      margin: 0 0 8px;
      font-size: 18px;
      font-weight: 500;
      display: flex;
      align-items: baseline;
      gap: 12px;
      flex-wrap: wrap;
    }
    .more {
      font-size: 13px;
      font-weight: 400;
      color: var(--mat-sys-primary);
    }
    .list {
      list-style: none;
      margin: 0;
      padding: 0;
      display: grid;
      gap: 6px;
    }
    li {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 4px 8px;
      font-size: 14px;
    }
    li mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
      color: var(--jw-muted-text);
    }
    li.open mat-icon {
      color: var(--jw-alarm-high);
    }
    li.closed {
      color: var(--jw-muted-text);
    }
    li.overdue .tag {
      color: var(--jw-warning);
      font-weight: 700;
    }
    .tag {
      font-size: 12px;
      padding: 0 6px;
      border-radius: 4px;
      background: var(--mat-sys-surface-container);
    }
    .when {
      font-size: 12px;
      color: var(--jw-muted-text);
    }
    .none {
      display: flex;
      align-items: center;
      gap: 6px;
      color: var(--jw-muted-text);
      margin: 0;
    }
    .error {
      color: var(--jw-alarm-high);
      margin: 0;
    }
    .decision {
      display: flex;
      align-items: center;
      gap: 6px;
      margin: 4px 0 0;
    }
    .decision.abnormal {
      color: var(--jw-warning);
      font-weight: 700;
    }
  `,
})
export class EngineHome {
  private readonly alarmsApi = inject(AlarmsApi);
  private readonly coolant = inject(CoolantService);
  private readonly workApi = inject(WorkApi);
  private readonly alarmStore = inject(AlarmStore);

  readonly engineId = input.required<number>();
  /** The zone times are written in (the site's, or the browser's by preference). */
  readonly zone = input<string | null>(null);

  protected readonly dueDays = DUE_WINDOW_DAYS;
  /** Each section is a resource of the engine id: a new engine asks again (cancelling what is still loading). */
  private readonly alarmsRes = rxResource({
    params: () => this.engineId(),
    // Every alarm of the engine (open and closed): the open ones all, the closed ones the newest few.
    stream: ({ params: id }) => this.alarmsApi.list('all', id).pipe(map((l) => l.filter((a) => a.engineId === id))),
  });
  private readonly dueRes = rxResource({
    params: () => this.engineId(),
    stream: ({ params: id }) =>
      this.coolant
        .dueList({ engineId: id, windowDays: DUE_WINDOW_DAYS })
        // The server filters by engine; the client filters too, in case an older server ignores the parameter.
        .pipe(map((res) => res.sites.flatMap((s) => s.entries).filter((e) => e.engineId === id && e.state !== 'ok'))),
  });
  private readonly workRes = rxResource({
    params: () => this.engineId(),
    stream: ({ params: id }) => this.workApi.list({ engineId: id, status: [...OPEN_WORK] }).pipe(map((l) => l.filter((w) => w.engineId === id))),
  });
  private readonly testsRes = rxResource({ params: () => this.engineId(), stream: ({ params: id }) => this.coolant.tests(id) });
  protected readonly alarms = sectionOf<Alarm>(this.alarmsRes, 'The alarms could not be loaded.');
  protected readonly due = sectionOf<DueEntry>(this.dueRes, 'The due tasks could not be loaded.');
  protected readonly work = sectionOf<WorkOrderSummary>(this.workRes, 'The work orders could not be loaded.');
  protected readonly tests = sectionOf<CoolantTest>(this.testsRes, 'The coolant tests could not be loaded.');

  protected readonly openAlarms = computed(() => (this.alarms().rows ?? []).filter((a) => a.state !== 'normal').sort(byRaisedDesc));
  protected readonly recentAlarms = computed(() => {
    const open = new Set(this.openAlarms().map((a) => a.id));
    return (this.alarms().rows ?? [])
      .filter((a) => !open.has(a.id))
      .sort(byRaisedDesc)
      .slice(0, RECENT_ALARMS);
  });
  protected readonly lastTest = computed(() => [...(this.tests().rows ?? [])].sort((a, b) => Date.parse(b.testedAt) - Date.parse(a.testedAt))[0] ?? null);
  protected readonly abnormalTest = computed(() => {
    const s = this.lastTest()?.decision?.additive?.status;
    return s === 'low' || s === 'high' || !!this.lastTest()?.decision?.freeze?.warnings?.length;
  });
  protected readonly decisionText = computed(() => {
    const t = this.lastTest();
    if (!t?.decision) return 'No decision on record';
    const a = t.decision.additive;
    const parts: string[] = [];
    if (a)
      parts.push(
        ADDITIVE_TEXT[a.status] ?? a.status,
        ...(a.filter ? [`fit the ${a.filter} filter`] : []),
        ...(a.liquidAdditiveL > 0 ? [`add ${a.liquidAdditiveL.toFixed(2)} L liquid additive`] : []),
      );
    if (t.decision.freeze) parts.push(`glycol ${t.decision.freeze.percent} %`);
    if (!parts.length && t.decision.notes.length) parts.push(t.decision.notes[0]);
    return parts.join(' · ') || 'No decision on record';
  });

  constructor() {
    // An alarm of this engine changed: its list follows.
    effect(() => {
      const changed = this.alarmStore.lastChange();
      if (changed && changed.engineId === untracked(this.engineId)) untracked(() => this.alarmsRes.reload());
    });
  }

  reload(): void {
    for (const res of [this.alarmsRes, this.dueRes, this.workRes, this.testsRes]) res.reload();
  }

  protected look(a: Alarm) {
    return priorityLook(a.priority);
  }
  protected state(a: Alarm): string {
    return stateText(a.state);
  }
  protected dueText(d: DueEntry): string {
    return DUE_TEXT[d.state];
  }
  protected statusText(w: WorkOrderSummary): string {
    return STATUS_TEXT[w.status] ?? w.status;
  }
}

function byRaisedDesc(a: Alarm, b: Alarm): number {
  return Date.parse(b.raisedAt) - Date.parse(a.raisedAt);
}
