import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';

export interface ReadinessView {
  ready: boolean;
  reasons: string[];
}

/**
 * A standby engine's readiness to start and take load, as a block with its reasons listed: "Ready" with a check
 * circle, or "Not ready" with a report octagon, the reasons in words; colour only when not ready.
 */
@Component({
  selector: 'jw-readiness-status',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <div class="readiness" [class.not-ready]="!readiness().ready" data-testid="readiness" [attr.data-ready]="readiness().ready" role="status">
      <mat-icon aria-hidden="true" [fontIcon]="readiness().ready ? 'check_circle' : 'report'" />
      <span class="readiness-text">{{ readiness().ready ? 'Ready' : 'Not ready' }}</span>
      @if (readiness().ready) {
        <span class="why">to start and take load: nothing found that would keep this standby engine from it</span>
      }
    </div>
    @if (!readiness().ready) {
      <ul class="reasons" data-testid="readiness-reasons">
        @for (r of readiness().reasons; track r) {
          <li>{{ r }}</li>
        }
      </ul>
    }
  `,
  styles: `
    :host {
      display: block;
    }
    .readiness {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      font-size: 15px;
      color: var(--jw-muted-text);
    }
    .readiness mat-icon {
      font-size: 20px;
      width: 20px;
      height: 20px;
    }
    .readiness-text {
      font-weight: 600;
    }
    .why {
      font-size: 13px;
    }
    .not-ready {
      color: var(--jw-alarm-high);
      border: 2px solid currentColor;
      border-radius: 4px;
      padding: 2px 8px;
    }
    .reasons {
      margin: 4px 0 0;
      padding-left: 24px;
      font-size: 14px;
    }
  `,
})
export class ReadinessStatus {
  readonly readiness = input.required<ReadinessView>();
}
