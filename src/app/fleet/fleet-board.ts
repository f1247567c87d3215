import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, signal, untracked } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { ActivatedRoute, ParamMap, Router } from '@angular/router';
import { AlarmStore } from '../alarms/alarm-store';
import { ClockService } from '../core/clock.service';
import { LiveService } from '../core/live.service';
import { ReadingCadence } from '../core/staleness';
import { CollapsedSites } from './collapsed-sites.service';
import { AbnormalCount, abnormalText, countAbnormal, engineCondition } from './engine-condition';
import { EngineTile } from './engine-tile';
import { matchesSearch, searchTerms } from './fleet-search';
import { RunState, Site } from './fleet-types';
import { FleetService } from './fleet.service';
import { runStateAt } from './run-state';
import { byName } from '../ui/by-name';

type StateFilter = 'all' | RunState;

interface SiteGroup {
  site: Site;
  /** The group's engines in name order (ids: the tiles look up each engine's current values by id). */
  engineIds: number[];
}

/** What the order and grouping of the board depend on: each engine's id, name and site, in the list's order. */
interface RosterEntry {
  id: number;
  name: string;
  siteId: number;
}

const sameRoster = (a: readonly RosterEntry[], b: readonly RosterEntry[]) =>
  a.length === b.length && a.every((x, i) => x.id === b[i].id && x.name === b[i].name && x.siteId === b[i].siteId);

const CONNECTION_TEXT = { connected: 'Live', connecting: 'Connecting…', offline: 'Not live', refused: 'Live push refused' } as const;

/** The operator's landing page: every engine, grouped by site, live. */
@Component({
  selector: 'jw-fleet-board',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    EngineTile,
  ],
  templateUrl: './fleet-board.html',
  styleUrl: './fleet-board.scss',
})
export class FleetBoard {
  private readonly fleet = inject(FleetService);
  private readonly clock = inject(ClockService);
  private readonly live = inject(LiveService);
  private readonly alarmStore = inject(AlarmStore);
  private readonly cadence = inject(ReadingCadence);
  private readonly route = inject(ActivatedRoute);
  private readonly router = inject(Router);
  protected readonly collapsed = inject(CollapsedSites);

  protected readonly loading = this.fleet.loading;
  protected readonly error = this.fleet.error;
  protected readonly sites = computed(() => [...this.fleet.sites()].sort((a, b) => byName(a.name, b.name)));
  protected readonly connection = this.live.connection;
  protected readonly connectionText = computed(() => CONNECTION_TEXT[this.connection()]);

  /** Empty means every site. */
  protected readonly siteFilter = signal<number[]>([]);
  protected readonly stateFilter = signal<StateFilter>('all');
  /** Only engines whose latest coolant test is short of their site's design low temperature. */
  protected readonly freezeOnly = signal(false);
  /** Engine or site name. It and the filters live in the address, so back, reload and a shared link keep them. */
  protected readonly search = new FormControl(this.route.snapshot.queryParamMap.get('q') ?? '', { nonNullable: true });
  protected readonly query = toSignal(this.search.valueChanges, { initialValue: this.search.value });
  private readonly terms = computed(() => searchTerms(this.query()));
  protected readonly searching = computed(() => this.terms().length > 0);
  /** A filter other than the search is on. */
  protected readonly filtered = computed(() => this.siteFilter().length > 0 || this.stateFilter() !== 'all' || this.freezeOnly());
  protected readonly freezeShortCount = computed(() => this.fleet.engines().filter((e) => e.freezeProtection?.status === 'short').length);

  /**
   * Names and sites only: live values change every engine several times a second, and none of them moves a tile, so
   * the board sorts and groups again only when an engine is added, removed, renamed or moved, or a filter changes.
   * Sorting 2,000 names on every update was the longest task of the board under the push bench.
   */
  private readonly roster = computed<RosterEntry[]>(() => this.fleet.engines().map((e) => ({ id: e.id, name: e.name, siteId: e.siteId })), {
    equal: sameRoster,
  });
  private readonly ordered = computed(() => [...this.roster()].sort((a, b) => byName(a.name, b.name)));
  private readonly engineById = this.fleet.engineById;

  private readonly states = computed(() => {
    const now = this.clock.now();
    return new Map(this.fleet.engines().map((e) => [e.id, runStateAt(e, now)]));
  });

  protected readonly counts = computed(() => {
    const c: Record<StateFilter, number> = { all: 0, running: 0, stopped: 0, 'no-data': 0 };
    for (const s of this.states().values()) {
      c.all++;
      c[s]++;
    }
    return c;
  });

  protected readonly groups = computed<SiteGroup[]>(() => {
    const sites = this.sites();
    const siteIds = new Set(this.siteFilter());
    const state = this.stateFilter();
    // live state and freeze protection only when a filter asks for them (then the groups follow their changes)
    const states = state === 'all' ? null : this.states();
    const byId = this.freezeOnly() ? this.engineById() : null;
    const terms = this.terms();
    const siteNames = new Map(sites.map((s) => [s.id, s.name]));
    const bySite = new Map<number, number[]>();
    for (const e of this.ordered()) {
      if (siteIds.size && !siteIds.has(e.siteId)) continue;
      if (states && states.get(e.id) !== state) continue;
      if (byId && byId.get(e.id)?.freezeProtection?.status !== 'short') continue;
      if (!matchesSearch(terms, e.name, siteNames.get(e.siteId) ?? `Site ${e.siteId}`)) continue;
      const list = bySite.get(e.siteId);
      if (list) list.push(e.id);
      else bySite.set(e.siteId, [e.id]);
    }
    const known = new Set(sites.map((s) => s.id));
    const groups = sites.filter((s) => bySite.has(s.id)).map((site) => ({ site, engineIds: bySite.get(site.id)! }));
    // Engines whose site is not in the list still show, under their site number.
    for (const [siteId, engineIds] of bySite) {
      if (!known.has(siteId)) groups.push({ site: { id: siteId, name: `Site ${siteId}`, timeZone: 'UTC' }, engineIds });
    }
    return groups;
  });

  protected readonly shownCount = computed(() => this.groups().reduce((n, g) => n + g.engineIds.length, 0));
  protected readonly shownText = computed(() => `${this.shownCount()} of ${this.counts().all} ${this.counts().all === 1 ? 'engine' : 'engines'} shown`);

  /** What a collapsed site's header says about its hidden tiles (expanded sites show the tiles themselves). */
  protected readonly abnormal = computed(() => {
    const collapsed = this.collapsed.ids();
    const now = this.clock.now();
    const out = new Map<number, { count: AbnormalCount; text: string }>();
    const byId = collapsed.size ? this.engineById() : null;
    for (const g of this.groups()) {
      if (!byId || !collapsed.has(g.site.id)) continue;
      const engines = g.engineIds.map((id) => byId.get(id)).filter((e) => e !== undefined);
      const count = countAbnormal(
        engines.map((e) => engineCondition(e, now, this.cadence.intervalFor(e.id), this.alarmStore.activeFor(e.id) ?? e.activeAlarms ?? 0)),
      );
      out.set(g.site.id, { count, text: abnormalText(count) });
    }
    return out;
  });
  protected readonly allCollapsed = computed(() => this.groups().every((g) => this.collapsed.ids().has(g.site.id)));

  /** ?q=north&state=running&site=2,5&freeze=short; absent means no such filter. */
  private readonly addressParams = computed(() => ({
    q: this.query().trim() || null,
    state: this.stateFilter() === 'all' ? null : this.stateFilter(),
    site: this.siteFilter().length ? sortedIds(this.siteFilter()) : null,
    freeze: this.freezeOnly() ? 'short' : null,
  }));
  /** Addresses this board wrote that the router has not reported back yet (typing runs ahead of navigation). */
  private readonly written: string[] = [];

  constructor() {
    // The search and the filters in the address: written as they change (no history entry per key), read when the address changes.
    this.route.queryParamMap.pipe(takeUntilDestroyed()).subscribe((params) => this.fromAddress(params));
    effect(() => {
      const queryParams = this.addressParams();
      const now = this.route.snapshot.queryParamMap;
      if (Object.entries(queryParams).every(([k, v]) => v === now.get(k))) return;
      this.written.push(JSON.stringify(queryParams));
      if (this.written.length > 20) this.written.shift();
      untracked(() => void this.router.navigate([], { relativeTo: this.route, queryParams, queryParamsHandling: 'merge', replaceUrl: true }));
    });
    void this.fleet.load();
    this.fleet.followFleet(inject(DestroyRef));
    // Back from a lost connection: load the list again, so values are current and an old error goes away.
    let wasLost = false;
    effect(() => {
      if (this.live.lostSince() !== null) {
        wasLost = true;
      } else if (wasLost && this.connection() === 'connected') {
        wasLost = false;
        untracked(() => void this.fleet.load());
      }
    });
  }

  private fromAddress(params: ParamMap): void {
    // our own earlier write coming back: the board is already past it
    const echo = this.written.indexOf(
      JSON.stringify({ q: params.get('q'), state: params.get('state'), site: params.get('site'), freeze: params.get('freeze') }),
    );
    if (echo >= 0) {
      this.written.splice(0, echo + 1);
      return;
    }
    const q = params.get('q') ?? '';
    if (q !== this.search.value.trim()) this.search.setValue(q);
    const state = params.get('state');
    this.stateFilter.set(state === 'running' || state === 'stopped' || state === 'no-data' ? state : 'all');
    const sites = (params.get('site') ?? '')
      .split(',')
      .map(Number)
      .filter((id) => Number.isInteger(id) && id > 0);
    if (sortedIds(sites) !== sortedIds(this.siteFilter())) this.siteFilter.set(sites);
    this.freezeOnly.set(params.get('freeze') === 'short');
  }

  protected retry(): void {
    void this.fleet.load();
  }

  protected setSites(ids: number[] | number | null | undefined): void {
    this.siteFilter.set(Array.isArray(ids) ? ids : ids == null ? [] : [ids]);
  }

  protected clearSearch(): void {
    this.search.setValue('');
  }

  protected clearFilters(): void {
    this.siteFilter.set([]);
    this.stateFilter.set('all');
    this.freezeOnly.set(false);
    this.clearSearch();
  }

  protected collapseAll(): void {
    this.collapsed.collapseAll([...this.sites().map((s) => s.id), ...this.groups().map((g) => g.site.id)]);
  }
}

const sortedIds = (ids: readonly number[]) => [...ids].sort((a, b) => a - b).join(',');
