import { ChangeDetectionStrategy, Component, DestroyRef, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { NetworkStatus } from '../../core/network-status';
import { STEP_UNIT_TEXT, formatDateTime } from '../work-labels';
import type { OutboxEntry } from './outbox-entry';
import { Outbox } from './outbox.service';

const KIND_TEXT: Record<OutboxEntry['kind'], string> = { draft: 'Draft', complete: 'Step done', photo: 'Photo', part: 'Part or fluid', status: 'Status' };
const UNIT_EXTRA: Record<string, string> = { degF: '°F', psi: 'psi', bar: 'bar', gal: 'US gal' };

/**
 * What this device keeps for one work order: changes waiting to be sent, those sent, and those the
 * server refused (shown plainly, with everything typed, never thrown away without the technician).
 */
@Component({
  selector: 'jw-outbox-panel',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule],
  template: `
    @if (entries().length) {
      <section class="outbox" aria-label="Kept on this device" data-test="outbox">
        <h2>Kept on this device</h2>
        <p class="summary" role="status" data-test="outbox-summary">
          @if (!net.online()) {
            <mat-icon fontIcon="cloud_off" aria-hidden="true" />No network.
          }
          {{ waiting().length }} waiting to be sent · {{ sent().length }} sent · {{ conflicts().length }} not accepted
          @if (outbox.sending()) {
            · sending…
          } @else if (waiting().length && net.online() && outbox.retryReason(); as why) {
            · will try again ({{ why }})
          }
        </p>
        <ol class="list">
          @for (e of entries(); track e.seq) {
            <li [attr.data-state]="e.state" [attr.data-test]="'outbox-' + e.state">
              <span class="state">
                @switch (e.state) {
                  @case ('waiting') {
                    <mat-icon fontIcon="schedule_send" aria-hidden="true" />Waiting to be sent
                  }
                  @case ('sent') {
                    <mat-icon fontIcon="cloud_done" aria-hidden="true" />Sent {{ time(e.sentAt) }}
                  }
                  @case ('conflict') {
                    <mat-icon fontIcon="report" aria-hidden="true" />NOT ACCEPTED
                  }
                }
              </span>
              <div class="body">
                <span class="what"
                  ><strong>{{ kindText[e.kind] }}</strong
                  >{{ e.stepTitle ? ': ' + e.stepTitle : '' }}</span
                >
                @if (detail(e); as d) {
                  <span class="detail">{{ d }}</span>
                }
                @if (e.file && thumbs().get(e.seq!); as url) {
                  <img class="thumb" [src]="url" [alt]="'Photo ' + (e.fileName ?? '')" />
                }
                <span class="when">recorded {{ time(e.recordedAt) }}</span>
                @if (e.state === 'conflict') {
                  <p class="conflict" role="alert">
                    The server refused it: {{ e.message }}. Nothing is lost: what you recorded is shown here. Tell the planner, or send it again once the order
                    is yours and in progress.
                  </p>
                  <span class="actions">
                    <button mat-stroked-button type="button" (click)="outbox.retry(e.seq!)"><mat-icon fontIcon="send" />Send again</button>
                    <button mat-button type="button" (click)="dismiss(e)"><mat-icon fontIcon="delete" />Remove from this device</button>
                  </span>
                }
              </div>
            </li>
          }
        </ol>
      </section>
    }
  `,
  styles: `
    .outbox {
      margin: 16px 0;
      padding: 12px 16px;
      border: 1px solid var(--mat-sys-outline-variant);
      border-radius: 8px;
    }
    h2 {
      margin: 0 0 4px;
      font-size: 18px;
    }
    .summary {
      display: flex;
      align-items: center;
      gap: 6px;
      margin: 0 0 8px;
    }
    .list {
      list-style: none;
      margin: 0;
      padding: 0;
      display: grid;
      gap: 6px;
    }
    li {
      display: grid;
      grid-template-columns: 200px 1fr;
      align-items: start;
      gap: 4px 12px;
      padding: 6px 8px;
      border-left: 4px solid var(--jw-band-normal);
    }
    .body {
      display: flex;
      flex-direction: column;
      align-items: flex-start;
      gap: 2px;
      min-width: 0;
    }
    @media (max-width: 599.98px) {
      li {
        grid-template-columns: 1fr;
      }
    }
    li[data-state='waiting'] {
      border-left-style: dashed;
    }
    li[data-state='conflict'] {
      border-left-color: var(--jw-warning);
      background: var(--jw-warning-bg);
    }
    .state {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      font-weight: 500;
    }
    li[data-state='conflict'] .state {
      color: var(--jw-warning);
    }
    .detail,
    .when {
      color: var(--jw-muted-text);
    }
    .thumb {
      width: 48px;
      height: 48px;
      object-fit: cover;
      border-radius: 4px;
    }
    .conflict {
      margin: 4px 0;
    }
    .actions {
      display: flex;
      gap: 8px;
      flex-wrap: wrap;
    }
    mat-icon {
      flex: none;
    }
  `,
})
export class OutboxPanel {
  protected readonly outbox = inject(Outbox);
  protected readonly net = inject(NetworkStatus);
  readonly orderId = input.required<number>();
  /** The site's zone for times (the app's one format). */
  readonly zone = input<string | null>(null);

  protected readonly kindText = KIND_TEXT;
  protected readonly entries = computed(() => {
    const mine = this.outbox.entries().filter((e) => e.orderId === this.orderId());
    const rank = { conflict: 0, waiting: 1, sent: 2 } as const;
    return mine.sort((a, b) => rank[a.state] - rank[b.state] || (a.seq ?? 0) - (b.seq ?? 0));
  });
  protected readonly waiting = computed(() => this.entries().filter((e) => e.state === 'waiting'));
  protected readonly sent = computed(() => this.entries().filter((e) => e.state === 'sent'));
  protected readonly conflicts = computed(() => this.entries().filter((e) => e.state === 'conflict'));

  private urls = new Map<number, string>();
  /** Object URLs of kept photos, made once per entry and revoked when gone. */
  protected readonly thumbs = computed(() => {
    const next = new Map<number, string>();
    for (const e of this.entries()) {
      if (!e.file || e.seq === undefined) continue;
      next.set(e.seq, this.urls.get(e.seq) ?? URL.createObjectURL(e.file));
    }
    for (const [seq, url] of this.urls) if (!next.has(seq)) URL.revokeObjectURL(url);
    this.urls = next;
    return next;
  });

  constructor() {
    inject(DestroyRef).onDestroy(() => {
      for (const url of this.urls.values()) URL.revokeObjectURL(url);
    });
  }

  protected time(t: number | null): string {
    return t === null ? '—' : formatDateTime(t, this.zone());
  }

  protected detail(e: OutboxEntry): string {
    const b = (e.body ?? {}) as {
      value?: number | null;
      unit?: string;
      note?: string;
      manualCheck?: { gaugeKpa: number; tempC: number; minutesSinceStop: number; checkedBy: string; reason: string };
    };
    const parts: string[] = [];
    if (b.value !== undefined && b.value !== null) parts.push(`${b.value} ${UNIT_EXTRA[b.unit ?? ''] ?? STEP_UNIT_TEXT[b.unit ?? ''] ?? b.unit ?? ''}`.trim());
    if (b.note) parts.push(`“${b.note}”`);
    if (b.manualCheck) {
      const m = b.manualCheck;
      parts.push(`MANUAL CHECK: gauge ${m.gaugeKpa} kPa, coolant ${m.tempC} °C, stopped ${m.minutesSinceStop} min, checked by ${m.checkedBy}; ${m.reason}`);
    }
    if (e.fileName) parts.push(e.fileName);
    return parts.join(' · ');
  }

  protected dismiss(e: OutboxEntry): void {
    if (confirm(`Remove this ${KIND_TEXT[e.kind].toLowerCase()} from the device? It was not accepted by the server and is kept nowhere else.`))
      void this.outbox.dismiss(e.seq!);
  }
}
