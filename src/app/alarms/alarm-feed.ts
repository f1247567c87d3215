import { Injectable, effect, inject, untracked } from '@angular/core';
import { Subscription, forkJoin } from 'rxjs';
import { AppBarStatus } from '../core/app-bar-status';
import { AuthService } from '../core/auth.service';
import { LiveService } from '../core/live.service';
import { AlarmStore } from './alarm-store';
import { Alarm } from './alarm-types';
import { AlarmsApi } from './alarms-api';

/** The summary (flood state) is fetched again at most this often while alarms change. */
const SUMMARY_EVERY_MS = 3000;
/** A full reload now and then heals anything a dropped connection missed. */
const RELOAD_EVERY_MS = 60_000;

/**
 * Feeds AlarmStore while someone is signed in: the open alarms and the summary from the API, then
 * every `alarm` event of the alarms room. Started once by the app shell; sets the app bar count.
 */
@Injectable({ providedIn: 'root' })
export class AlarmFeed {
  private readonly api = inject(AlarmsApi);
  private readonly store = inject(AlarmStore);
  private readonly live = inject(LiveService);
  private readonly appBar = inject(AppBarStatus);

  private unwatch: (() => void) | null = null;
  private sub: Subscription | null = null;
  private reloadTimer: ReturnType<typeof setInterval> | null = null;
  private summaryTimer: ReturnType<typeof setTimeout> | null = null;

  constructor() {
    const auth = inject(AuthService);
    effect(() => {
      const signedIn = auth.signedIn();
      untracked(() => (signedIn ? this.start() : this.stop()));
    });
    // After a reconnect, events may have been missed.
    effect(() => {
      if (this.live.connection() === 'connected') untracked(() => this.unwatch && this.reload());
    });
    effect(() => {
      const count = this.store.loaded() ? this.store.activeCount() : null;
      untracked(() => this.appBar.activeAlarms.set(count));
    });
  }

  /** Load everything again now. */
  reload(): void {
    forkJoin([this.api.list('open'), this.api.summary()]).subscribe({
      next: ([open, summary]) => {
        if (!this.unwatch) return;
        this.store.setOpen(open);
        this.store.setSummary(summary);
      },
      // the next reload or event tries again; the count stays as it was
      error: () => undefined,
    });
  }

  private start(): void {
    if (this.unwatch) return;
    // the alarms room only: the fleet's readings are for screens that show them
    this.unwatch = this.live.watch({ alarms: true });
    this.sub = this.live.alarms$.subscribe((msg) => {
      this.store.apply(msg as unknown as Alarm);
      this.summarySoon();
    });
    this.reloadTimer = setInterval(() => this.reload(), RELOAD_EVERY_MS);
    this.reload();
  }

  private summarySoon(): void {
    this.summaryTimer ??= setTimeout(() => {
      this.summaryTimer = null;
      this.api.summary().subscribe({
        next: (s) => {
          if (this.unwatch) this.store.setSummary(s);
        },
        error: () => undefined, // kept the last one
      });
    }, SUMMARY_EVERY_MS);
  }

  private stop(): void {
    this.unwatch?.();
    this.unwatch = null;
    this.sub?.unsubscribe();
    this.sub = null;
    if (this.reloadTimer) clearInterval(this.reloadTimer);
    if (this.summaryTimer) clearTimeout(this.summaryTimer);
    this.reloadTimer = null;
    this.summaryTimer = null;
    this.store.clear();
  }
}
