import { HttpClient } from '@angular/common/http';
import { DestroyRef, Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { ChannelKey, channelByCode, isChannelKey } from '../../../shared/channels';
import { ChannelValue, ChannelValues, LiveReadings } from '../core/live-reading';
import { LiveService } from '../core/live.service';
import { Engine, Site } from './fleet-types';

/**
 * Live readings are gathered and applied together at most this often. An update re-sorts nothing and touches only the
 * tiles on screen whose engine changed, so at 2,000 engines it is cheap enough to apply every 100 ms: what the screen
 * shows then lags the socket by at most that (it was 500 ms, more than the whole publish -> browser goal).
 */
const APPLY_EVERY_MS = 100;
/** Standby readiness (heater, alarms, lockouts) is computed by the server: asked again this often. */
const READINESS_EVERY_MS = 30_000;

/** Sites and engines with their latest values, kept current from the live push while a screen uses it. */
@Injectable({ providedIn: 'root' })
export class FleetService {
  private readonly http = inject(HttpClient);
  private readonly live = inject(LiveService);

  private readonly sitesSignal = signal<Site[]>([]);
  private readonly enginesSignal = signal<Engine[]>([]);
  private readonly loadingSignal = signal(false);
  private readonly errorSignal = signal<string | null>(null);

  readonly sites = this.sitesSignal.asReadonly();
  readonly engines = this.enginesSignal.asReadonly();
  readonly loading = this.loadingSignal.asReadonly();
  readonly error = this.errorSignal.asReadonly();
  readonly siteById = computed(() => new Map(this.sitesSignal().map((s) => [s.id, s])));
  /** Each engine as it is now, by id (a fleet-board tile reads its own engine here). */
  readonly engineById = computed(() => new Map(this.enginesSignal().map((e) => [e.id, e])));

  private pending = new Map<number, ChannelValues>();
  private flushTimer: ReturnType<typeof setTimeout> | null = null;

  async load(): Promise<void> {
    this.loadingSignal.set(true);
    this.errorSignal.set(null);
    try {
      const [sites, engines] = await Promise.all([
        firstValueFrom(this.http.get<Site[]>('/api/sites')),
        firstValueFrom(this.http.get<Engine[]>('/api/engines')),
      ]);
      this.sitesSignal.set(sites);
      this.enginesSignal.set(engines.map((e) => ({ ...e, latest: normaliseValues(e.latest ?? {}) })));
    } catch {
      this.errorSignal.set('The engine list could not be loaded.');
    } finally {
      this.loadingSignal.set(false);
    }
  }

  /** Follow the whole fleet live until the caller's DestroyRef ends. */
  followFleet(destroyRef: DestroyRef): void {
    const unwatch = this.live.watch({ fleet: true });
    const sub = this.live.readingBatches$.subscribe((batch) => this.queue(batch));
    // the user's sites changed: the engine list is theirs to see anew (the live rooms already are)
    const scope = this.live.scopeChanged$.subscribe(() => void this.load());
    const readiness = setInterval(() => void this.refreshReadiness(), READINESS_EVERY_MS);
    destroyRef.onDestroy(() => {
      unwatch();
      sub.unsubscribe();
      scope.unsubscribe();
      clearInterval(readiness);
    });
  }

  /** Take the standby engines' readiness and each engine's freeze protection from a fresh engine list (values stay from the live push). */
  private async refreshReadiness(): Promise<void> {
    try {
      const fresh = new Map(
        (await firstValueFrom(this.http.get<Engine[]>('/api/engines'))).map((e) => [e.id, { readiness: e.readiness, freezeProtection: e.freezeProtection }]),
      );
      this.enginesSignal.update((list) =>
        list.map((e) => {
          const f = fresh.get(e.id);
          const same =
            JSON.stringify(e.readiness) === JSON.stringify(f?.readiness) && JSON.stringify(e.freezeProtection) === JSON.stringify(f?.freezeProtection);
          return same ? e : { ...e, readiness: f?.readiness, freezeProtection: f?.freezeProtection };
        }),
      );
    } catch {
      // kept as it was; the next round tries again
    }
  }

  /** A batch of engines (one message of the server's interval): O(engines in it). */
  private queue(batch: readonly LiveReadings[]): void {
    for (const r of batch) {
      const values = normaliseValues(r.values);
      const before = this.pending.get(r.engineId);
      this.pending.set(r.engineId, before ? { ...before, ...values } : values);
    }
    this.flushTimer ??= setTimeout(() => this.flush(), APPLY_EVERY_MS);
  }

  private flush(): void {
    this.flushTimer = null;
    const pending = this.pending;
    this.pending = new Map();
    // Only engines with news get a new object, so only their tiles draw again.
    this.enginesSignal.update((list) =>
      list.map((e) => {
        const values = pending.get(e.id);
        return values ? { ...e, latest: { ...e.latest, ...values } } : e;
      }),
    );
  }
}

/** Accepts channel keys or the numeric codes of shared/channels.ts. */
function normaliseValues(values: Record<string, ChannelValue | undefined>): ChannelValues {
  const out: ChannelValues = {};
  for (const [key, v] of Object.entries(values)) {
    if (!v || typeof v.value !== 'number') continue;
    const channel: ChannelKey | undefined = isChannelKey(key) ? key : channelByCode(Number(key))?.key;
    if (channel) out[channel] = v;
  }
  return out;
}
