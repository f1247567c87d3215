import { Injectable, computed, signal } from '@angular/core';
import { isAnnunciated, AlarmState } from '../../../shared/alarms/alarm-state';
import { Alarm, AlarmSummary } from './alarm-types';

/**
 * The open alarms of the fleet as signals, kept current by AlarmFeed from the API and the `alarm`
 * live event. No dependencies, so any screen (the fleet tile, the app bar) can read it cheaply.
 */
@Injectable({ providedIn: 'root' })
export class AlarmStore {
  private readonly byId = signal<ReadonlyMap<number, Alarm>>(new Map());
  private readonly loadedSignal = signal(false);
  private readonly summarySignal = signal<AlarmSummary | null>(null);
  private readonly lastChangeSignal = signal<Alarm | null>(null);

  /** False until the first list arrived: counts are unknown, not zero. */
  readonly loaded = this.loadedSignal.asReadonly();
  readonly summary = this.summarySignal.asReadonly();
  /** The latest alarm that changed (live), for screens that keep their own lists. */
  readonly lastChange = this.lastChangeSignal.asReadonly();

  /** Every alarm not yet closed, newest first. */
  readonly open = computed(() => [...this.byId().values()].sort((a, b) => Date.parse(b.raisedAt) - Date.parse(a.raisedAt) || b.id - a.id));

  /** Annunciated alarms (unacknowledged, acknowledged, returned unacknowledged) per engine. */
  readonly activeByEngine = computed(() => {
    const counts = new Map<number, number>();
    for (const a of this.byId().values()) if (isAnnunciated(a.state as AlarmState)) counts.set(a.engineId, (counts.get(a.engineId) ?? 0) + 1);
    return counts;
  });

  readonly activeCount = computed(() => {
    let n = 0;
    for (const c of this.activeByEngine().values()) n += c;
    return n;
  });

  readonly flooding = computed(() => this.summarySignal()?.flood.flooding ?? false);

  /** Active alarms on one engine; null while not loaded. */
  activeFor(engineId: number): number | null {
    return this.loadedSignal() ? (this.activeByEngine().get(engineId) ?? 0) : null;
  }

  setOpen(alarms: readonly Alarm[]): void {
    this.byId.set(new Map(alarms.filter((a) => !a.closedAt).map((a) => [a.id, a])));
    this.loadedSignal.set(true);
  }

  /** One changed alarm: a closed alarm leaves the open set. */
  apply(alarm: Alarm): void {
    this.byId.update((map) => {
      const next = new Map(map);
      if (alarm.closedAt) next.delete(alarm.id);
      else next.set(alarm.id, alarm);
      return next;
    });
    this.lastChangeSignal.set(alarm);
  }

  setSummary(summary: AlarmSummary | null): void {
    this.summarySignal.set(summary);
  }

  clear(): void {
    this.byId.set(new Map());
    this.loadedSignal.set(false);
    this.summarySignal.set(null);
    this.lastChangeSignal.set(null);
  }
}
