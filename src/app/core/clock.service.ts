import { DestroyRef, Injectable, inject, signal } from '@angular/core';

/** How often ages on screen ("no data for 4 min") move on. One timer for the whole app, never one per tile. */
export const CLOCK_TICK_MS = 5000;

@Injectable({ providedIn: 'root' })
export class ClockService {
  private readonly nowSignal = signal(Date.now());
  readonly now = this.nowSignal.asReadonly();

  constructor() {
    const timer = setInterval(() => this.nowSignal.set(Date.now()), CLOCK_TICK_MS);
    inject(DestroyRef).onDestroy(() => clearInterval(timer));
  }
}
