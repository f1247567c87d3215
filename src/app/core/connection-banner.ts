import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { browserZone, formatInZone } from '../ui/time-format';
import { ClockService } from './clock.service';
import { LiveService } from './live.service';
import { ageText } from './staleness';

/**
 * On every page while the live connection is down: since when, and that values on screen are not current.
 * It goes away by itself when the connection comes back.
 */
@Component({
  selector: 'jw-connection-banner',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    @if (since(); as s) {
      <div class="banner" role="alert" data-test="connection-banner">
        <mat-icon aria-hidden="true" fontIcon="cloud_off" />
        <span
          ><strong>Live data lost since {{ s }}</strong> ({{ ago() }} ago). Values on screen are not current; reconnecting by itself.</span
        >
      </div>
    }
  `,
  styles: `
    :host {
      display: block;
      position: sticky;
      top: 0;
      z-index: 5;
    }
    .banner {
      display: flex;
      align-items: center;
      gap: 8px;
      padding: 8px 16px;
      background: var(--jw-stale-bg);
      color: var(--jw-stale);
      border-bottom: 2px dashed var(--jw-stale);
      font-size: 14px;
    }
    mat-icon {
      flex: none;
    }
  `,
})
export class ConnectionBanner {
  private readonly live = inject(LiveService);
  private readonly clock = inject(ClockService);

  protected readonly since = computed(() => {
    const t = this.live.lostSince();
    return t === null ? null : formatInZone(t, browserZone(), 'time-s');
  });
  protected readonly ago = computed(() => ageText(Math.max(0, this.clock.now() - (this.live.lostSince() ?? 0))));
}
