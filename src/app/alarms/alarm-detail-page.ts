import { ChangeDetectionStrategy, Component, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { lastValue } from '../core/last-value';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatTableModule } from '@angular/material/table';
import { Router, RouterLink } from '@angular/router';
import { MatDialog } from '@angular/material/dialog';
import { suggestedWorkKind } from '../../../shared/alarms/work-kind';
import { CreateWorkData, CreateWorkDialog } from '../work/create-work-dialog';
import { WorkOrderDetail } from '../work/work-types';
import { ClockService } from '../core/clock.service';
import { DisplayZone } from '../core/display-zone';
import { FleetService } from '../fleet/fleet.service';
import { PreferencesService } from '../core/preferences.service';
import { AlarmActions } from './alarm-actions';
import { eventText, formatAlarmValue, formatDuration, formatTime, needsAcknowledge, priorityLook, stateText } from './alarm-labels';
import { AlarmStore } from './alarm-store';
import { Alarm, AlarmDetail, AlarmHistoryEntry } from './alarm-types';
import { AlarmsApi, errorText } from './alarms-api';

/** One alarm: what it means, the first safe step, its values, its history of transitions and its notes. */
@Component({
  selector: 'jw-alarm-detail-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatCardModule, MatIconModule, MatProgressBarModule, MatTableModule, RouterLink],
  templateUrl: './alarm-detail-page.html',
  styleUrl: './alarm-detail-page.scss',
})
export class AlarmDetailPage {
  private readonly api = inject(AlarmsApi);
  private readonly store = inject(AlarmStore);
  private readonly actions = inject(AlarmActions);
  private readonly prefs = inject(PreferencesService);
  private readonly clock = inject(ClockService);
  private readonly dialog = inject(MatDialog);
  private readonly router = inject(Router);

  /** Route parameter. */
  readonly id = input.required<string>();

  /** The alarm with its history; a new id asks again, and actions and live changes reload it. */
  private readonly record = rxResource({
    params: () => {
      const id = Number(this.id());
      return Number.isInteger(id) && id > 0 ? id : undefined;
    },
    stream: ({ params: id }) => this.api.get(id),
  });
  /** Kept in view while it reloads; "more history" appends to it. */
  protected readonly alarm = lastValue<AlarmDetail | null>(this.record, null);
  private readonly moreError = signal<string | null>(null);
  protected readonly error = computed(() => {
    if (this.record.status() === 'idle') return 'There is no such alarm.';
    const err = this.record.error();
    return err ? errorText(err, 'The alarm could not be loaded') : this.moreError();
  });
  protected readonly can = this.actions.permissions();
  protected readonly columns = ['at', 'event', 'change', 'value', 'note'];

  protected readonly look = computed(() => priorityLook(this.alarm()?.priority ?? ''));
  protected readonly unack = computed(() => needsAcknowledge(this.alarm()?.state ?? ''));
  protected readonly stateWords = computed(() => stateText(this.alarm()?.state ?? ''));
  protected readonly age = computed(() => {
    const a = this.alarm();
    return a ? formatDuration(this.clock.now() - Date.parse(a.raisedAt)) : '';
  });
  /** The alarm's history in time order, oldest first (as it happened). */
  protected readonly history = computed(() => [...(this.alarm()?.history ?? [])].sort((a, b) => Date.parse(a.at) - Date.parse(b.at)));
  protected readonly notes = computed(() => this.history().filter((h) => h.note && h.userId !== null));
  private readonly fleet = inject(FleetService);
  private readonly zones = inject(DisplayZone);
  /** The alarm's site zone (or the browser's by preference). */
  protected readonly zone = computed(() => {
    const siteId = this.alarm()?.siteId;
    return this.zones.zoneFor(siteId == null ? null : this.fleet.siteById().get(siteId)?.timeZone);
  });
  /** A short dialog first (kind suggested by the alarm's rule, assignee, due date); then to the new work order. */
  protected createWorkOrder(a: Alarm): void {
    const data: CreateWorkData = {
      engineId: a.engineId,
      engineName: a.engineName ?? `Engine ${a.engineId}`,
      kind: suggestedWorkKind(a.rule),
      alarmId: a.id,
      from: `Alarm #${a.id}: ${a.title}`,
    };
    this.dialog
      .open<CreateWorkDialog, CreateWorkData, WorkOrderDetail>(CreateWorkDialog, { data, width: '520px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((wo) => {
        if (wo) void this.router.navigate(['/work', wo.id]);
      });
  }
  protected readonly canShelve = computed(() => {
    const s = this.alarm()?.state;
    return this.can.shelve && !this.alarm()?.closedAt && s !== 'shelved' && s !== 'out-of-service' && s !== 'suppressed-by-design';
  });

  constructor() {
    if (!this.fleet.sites().length) void this.fleet.load();
    // Live: this alarm changed somewhere (another user, the rules): fetch it again with its history.
    effect(() => {
      const changed = this.store.lastChange();
      if (changed && changed.id === Number(untracked(this.id))) untracked(() => this.load());
    });
  }

  protected value(v: number | null | undefined): string {
    return formatAlarmValue(v, this.alarm()?.unit, this.prefs.preferences());
  }
  protected time(t: string | null | undefined): string {
    return formatTime(t, this.zone());
  }
  protected event(h: AlarmHistoryEntry): string {
    return eventText(h.event);
  }
  protected change(h: AlarmHistoryEntry): string {
    if (!h.fromState || !h.toState || h.fromState === h.toState) return '';
    return `${stateText(h.fromState)} → ${stateText(h.toState)}`;
  }

  protected async acknowledge(a: Alarm): Promise<void> {
    if (await this.actions.acknowledge(a)) this.load();
  }
  protected async shelve(a: Alarm): Promise<void> {
    if (await this.actions.shelve(a)) this.load();
  }
  protected async unshelve(a: Alarm): Promise<void> {
    if (await this.actions.unshelve(a)) this.load();
  }
  protected more(a: AlarmDetail): void {
    this.api.history(a.id, a.history.length).subscribe({
      next: (page) => this.alarm.set({ ...a, history: [...a.history, ...page.entries], historyTotal: page.total }),
      error: (err: unknown) => this.moreError.set(errorText(err, 'More of the history could not be loaded')),
    });
  }
  protected async note(a: Alarm): Promise<void> {
    if (await this.actions.note(a)) this.load();
  }

  private load(): void {
    this.moreError.set(null);
    this.record.reload();
  }
}
