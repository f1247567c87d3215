import { ChangeDetectionStrategy, Component, computed, effect, inject, linkedSignal, signal, untracked } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
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
import { LIST_PAGE_SIZE, LIST_PAGE_SIZES, ListPage } from '../core/list-page';
import { lastValue } from '../core/last-value';

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

  protected readonly pageSize = signal(LIST_PAGE_SIZE);
  protected readonly pageSizes = LIST_PAGE_SIZES;
  /** Back to the first page whenever a filter changes. */
  protected readonly offset = linkedSignal<unknown, number>({
    source: () => [this.siteId(), this.engineId(), this.priority(), this.state(), this.pageSize()],
    computation: () => 0,
  });
  /**
   * The history is paged on the server, asked for only in the History view. A newer filter or page cancels the
   * request still loading, so the newest request always wins.
   */
  private readonly historyPage = rxResource({
    params: () => (this.view() === 'all' ? this.historyFilter() : undefined),
    stream: ({ params: filter }) => this.historyApi.page(filter),
  });
  /** This page of the history (kept while the next one loads; live changes written in) and how many alarms match over all pages. */
  private readonly historyShown = lastValue<ListPage<Alarm>>(this.historyPage, { items: [], total: 0, limit: LIST_PAGE_SIZE, offset: 0 });
  private readonly history = computed(() => this.historyShown().items);
  protected readonly historyTotal = computed(() => this.historyShown().total);
  protected readonly historyLoading = this.historyPage.isLoading;
  protected readonly error = computed(() => {
    const err = this.historyPage.error();
    return err ? errorText(err, 'The alarm history could not be loaded') : null;
  });
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

    // Live: a changed alarm replaces its old line in the history too (a new one shows on the first page).
    effect(() => {
      const changed = this.store.lastChange();
      if (!changed) return;
      untracked(() =>
        this.historyShown.update((page) => {
          const list = page.items;
          const i = list.findIndex((a) => a.id === changed.id);
          if (i < 0) return this.offset() === 0 ? { ...page, items: [changed, ...list] } : page;
          const next = [...list];
          next[i] = changed;
          return { ...page, items: next };
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
    this.historyPage.reload();
  }

  /** The history page asked for: the filters on screen and the page (signals read here are the resource's params). */
  private historyFilter(): AlarmHistoryFilter {
    return { siteId: this.siteId(), engineId: this.engineId(), priority: this.priority(), state: this.state(), offset: this.offset(), limit: this.pageSize() };
  }

  protected onPage(e: PageEvent): void {
    if (e.pageSize !== this.pageSize()) return this.pageSize.set(e.pageSize);
    this.offset.set(e.pageIndex * e.pageSize);
  }
}
