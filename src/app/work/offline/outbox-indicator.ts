import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { Outbox } from './outbox.service';

/** In the app bar while something recorded on this device waits to be sent or was refused; leads to its work order. */
@Component({
  selector: 'jw-outbox-indicator',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule, RouterLink],
  template: `
    @if (first(); as f) {
      <a class="chip" [class.conflict]="conflicts()" [routerLink]="['/work', f.orderId]" data-test="outbox-indicator" [attr.aria-label]="label()"
        ><mat-icon aria-hidden="true" [fontIcon]="conflicts() ? 'report' : 'schedule_send'" /><span class="jw-num">{{ waiting() + conflicts() }}</span
        ><span class="word">&nbsp;{{ conflicts() ? 'not accepted' : 'to send' }}</span></a
      >
    }
  `,
  styles: `
    .chip {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 10px;
      margin-right: 8px;
      border: 1px dashed currentColor;
      border-radius: 16px;
      color: inherit;
      text-decoration: none;
      font-size: 14px;
    }
    .chip.conflict {
      border-style: solid;
      color: var(--jw-warning);
      background: var(--jw-warning-bg);
    }
    @media (max-width: 599.98px) {
      .word {
        display: none;
      }
    }
  `,
})
export class OutboxIndicator {
  private readonly outbox = inject(Outbox);
  protected readonly waiting = computed(() => this.outbox.waiting().length);
  protected readonly conflicts = computed(() => this.outbox.conflicts().length);
  protected readonly first = computed(() => this.outbox.conflicts()[0] ?? this.outbox.waiting()[0] ?? null);
  protected readonly label = computed(() => `${this.waiting()} waiting to be sent, ${this.conflicts()} not accepted by the server`);
}
