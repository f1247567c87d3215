import { Injectable, signal } from '@angular/core';

/**
 * What the app bar shows beside the title. The alarms feature sets activeAlarms;
 * null hides the count (no alarms feature yet).
 */
@Injectable({ providedIn: 'root' })
export class AppBarStatus {
  readonly activeAlarms = signal<number | null>(null);
}
