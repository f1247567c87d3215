import { firstValueFrom } from 'rxjs';
import { ChangeDetectionStrategy, Component, computed, effect, inject, linkedSignal, signal, untracked } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { ALARM_STATES, AlarmState, isAnnunciated } from '../../../shared/alarms/alarm-state';
import { ClockService } from '../core/clock.service';
import { DisplayZone } from '../core/display-zone';
import { FleetService } from '../fleet/fleet.service';
import { AlarmActions } from './alarm-actions';
import { PRIORITY_LOOK, PRIORITY_ORDER, formatTime, needsAcknowledge, priorityLook, stateText } from './alarm-labels';
import { AlarmRow } from './alarm-row';
import { AlarmStore } from './alarm-store';
import { Alarm, AlarmListView, AlarmPriority } from './alarm-types';
import { errorText } from './alarms-api';
import { byName } from '../ui/by-name';
import { AlarmHistoryApi, AlarmHistoryFilter } from './alarm-history-api';
import { LIST_PAGE_SIZE, LIST_PAGE_SIZES } from '../core/list-page';

const VIEW_TEXT: Record<AlarmListView, string> = { active: 'Now', shelved: 'On the shelf', all: 'History' };

/** Alarm list: what needs attention now, what is shelved, and the history, with filters and live updates. */
@Component({
  selector: 'jw-alarm-list-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    MatButtonToggleModule,
    MatButtonModule,
    MatFormFieldModule,
    MatSelectModule,
    MatIconModule,
    MatPaginatorModule,
    MatProgressBarModule,
    RouterLink,
    AlarmRow,
  ],
  templateUrl: './alarm-list-page.html',
  styleUrl: './alarm-list-page.scss',
})
export class AlarmListPage {
  private readonly store = inject(AlarmStore);
  private readonly historyApi = inject(AlarmHistoryApi);
  private readonly fleet = inject(FleetService);
  private readonly clock = inject(ClockService);
  private readonly actions = inject(AlarmActions);
  private readonly router = inject(Router);
  private readonly zones = inject(DisplayZone);

  protected readonly views = Object.entries(VIEW_TEXT) as [AlarmListView, string][];
  protected readonly priorities = PRIORITY_ORDER.map((p) => ({ value: p, ...PRIORITY_LOOK[p] }));
  protected readonly states = ALARM_STATES.filter((s) => s !== 'normal').map((s) => ({ value: s, text: stateText(s) }));
  protected readonly can = this.actions.permissions();
  protected readonly now = this.clock.now;
  protected readonly summary = this.store.summary;
  protected readonly flooding = this.store.flooding;
  protected readonly floodSince = computed(() => formatTime(this.store.summary()?.flood.since ?? null));

  protected readonly view = signal<AlarmListView>('active');
  protected readonly siteId = signal<number | null>(null);
  protected readonly engineId = signal<number | null>(null);
  protected readonly priority = signal<AlarmPriority | null>(null);
  protected readonly state = signal<AlarmState | null>(null);

  private readonly history = signal<Alarm[]>([]);
  /** The history is paged on the server: this page's place, and how many alarms match over all pages. */
  protected readonly historyTotal = signal(0);
  protected readonly pageSize = signal(LIST_PAGE_SIZE);
  protected readonly pageSizes = LIST_PAGE_SIZES;
  /** Back to the first page whenever a filter changes. */
  protected readonly offset = linkedSignal<unknown, number>({
    source: () => [this.siteId(), this.engineId(), this.priority(), this.state(), this.pageSize()],
    computation: () => 0,
  });
  protected readonly historyLoading = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly loaded = this.store.loaded;

  protected readonly sites = this.fleet.sites;
  protected readonly engines = computed(() => {
    const site = this.siteId();
    return this.fleet
      .engines()
      .filter((e) => site === null || e.siteId === site)
      .sort((a, b) => byName(a.name, b.name));
  });

  private readonly source = computed<Alarm[]>(() => {
    const view = this.view();
    if (view === 'all') return this.history();
    const open = this.store.open();
    return view === 'shelved' ? open.filter((a) => a.state === 'shelved') : open.filter((a) => isAnnunciated(a.state));
  });

  protected readonly alarms = computed(() => {
    const site = this.siteId();
    const engine = this.engineId();
    const priority = this.priority();
    const state = this.state();
    const list = this.source().filter(
      (a) =>
        (site === null || a.siteId === site) &&
        (engine === null || a.engineId === engine) &&
        (priority === null || a.priority === priority) &&
        (state === null || a.state === state),
    );
    // History in time order: the newest raised first.
    if (this.view() === 'all') return [...list].sort((a, b) => Date.parse(b.raisedAt) - Date.parse(a.raisedAt) || b.id - a.id);
    // Waiting for acknowledge first, then the most urgent, then the newest.
    return [...list].sort(
      (a, b) =>
        Number(needsAcknowledge(b.state)) - Number(needsAcknowledge(a.state)) ||
        priorityLook(b.priority).rank - priorityLook(a.priority).rank ||
        Date.parse(b.raisedAt) - Date.parse(a.raisedAt),
    );
  });

  protected readonly waiting = computed(() => this.alarms().filter((a) => needsAcknowledge(a.state)).length);
  protected readonly filtered = computed(() => this.siteId() !== null || this.engineId() !== null || this.priority() !== null || this.state() !== null);

  constructor() {
    const q = inject(ActivatedRoute).snapshot.queryParamMap;
    const view = q.get('view');
    if (view === 'shelved' || view === 'all') this.view.set(view);
    const num = (k: string) => (q.get(k) && Number.isInteger(Number(q.get(k))) ? Number(q.get(k)) : null);
    this.engineId.set(num('engineId'));
    this.siteId.set(num('siteId'));
    const priority = q.get('priority');
    if (priority && (PRIORITY_ORDER as readonly string[]).includes(priority)) this.priority.set(priority as AlarmPriority);
    const state = q.get('state');
    if (state && this.states.some((s) => s.value === state)) this.state.set(state as AlarmState);

    // The view and the filters live in the address, so back, reload and a shared link keep them.
    effect(() => {
      const queryParams = {
        view: this.view() === 'active' ? null : this.view(),
        siteId: this.siteId(),
        engineId: this.engineId(),
        priority: this.priority(),
        state: this.state(),
      };
      untracked(() => void this.router.navigate([], { queryParams, replaceUrl: true }));
    });
    if (!this.fleet.engines().length) void this.fleet.load();

    effect(() => {
      const filter = this.historyFilter();
      if (this.view() === 'all') untracked(() => void this.loadHistory(filter));
    });
    // Live: a changed alarm replaces its old line in the history too (a new one shows on the first page).
    effect(() => {
      const changed = this.store.lastChange();
      if (!changed) return;
      untracked(() =>
        this.history.update((list) => {
          const i = list.findIndex((a) => a.id === changed.id);
          if (i < 0) return this.offset() === 0 ? [changed, ...list] : list;
          const next = [...list];
          next[i] = changed;
          return next;
        }),
      );
    });
  }

  protected zoneOf(siteId: number | null): string {
    return this.zones.zoneFor(siteId === null ? null : this.fleet.siteById().get(siteId)?.timeZone);
  }

  protected setView(v: AlarmListView): void {
    this.view.set(v);
    if (v !== 'all') this.state.set(null);
  }

  protected setSite(id: number | null): void {
    this.siteId.set(id);
    const engine = this.engineId();
    if (id !== null && engine !== null && this.fleet.engines().find((e) => e.id === engine)?.siteId !== id) this.engineId.set(null);
  }

  protected clearFilters(): void {
    this.siteId.set(null);
    this.engineId.set(null);
    this.priority.set(null);
    this.state.set(null);
  }

  protected acknowledge(a: Alarm): void {
    void this.actions.acknowledge(a);
  }
  protected shelve(a: Alarm): void {
    void this.actions.shelve(a);
  }
  protected unshelve(a: Alarm): void {
    void this.actions.unshelve(a);
  }
  protected note(a: Alarm): void {
    void this.actions.note(a);
  }

  protected retryHistory(): void {
    void this.loadHistory(this.historyFilter());
  }

  /** The history page asked for: the filters on screen and the page (signals read here are the effect's triggers). */
  private historyFilter(): AlarmHistoryFilter {
    return { siteId: this.siteId(), engineId: this.engineId(), priority: this.priority(), state: this.state(), offset: this.offset(), limit: this.pageSize() };
  }

  protected onPage(e: PageEvent): void {
    if (e.pageSize !== this.pageSize()) return this.pageSize.set(e.pageSize);
    this.offset.set(e.pageIndex * e.pageSize);
  }

  private loadSeq = 0;
  private async loadHistory(filter: AlarmHistoryFilter): Promise<void> {
    const seq = ++this.loadSeq;
    this.historyLoading.set(true);
    this.error.set(null);
    try {
      const page = await firstValueFrom(this.historyApi.page(filter));
      if (seq !== this.loadSeq) return; // a later request (another filter or page) answers instead
      this.history.set(page.items);
      this.historyTotal.set(page.total);
    } catch (err) {
      this.error.set(errorText(err, 'The alarm history could not be loaded'));
    } finally {
      if (seq === this.loadSeq) this.historyLoading.set(false);
    }
  }
}
