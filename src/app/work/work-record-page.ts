import { ChangeDetectionStrategy, Component, ViewEncapsulation, computed, inject, input } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { WorkApi, errorText } from './work-api';
import { CONDITION_TEXT, EVENT_TEXT, PART_TEXT, PRIORITY_TEXT, STATUS_TEXT, STEP_UNIT_TEXT, formatDate, formatDateTime } from './work-labels';
import { WorkOrderDetail, WorkStep } from './work-types';

/** The service record of one work order, laid out for paper: `window.print()` gives a clean copy. */
@Component({
  selector: 'jw-work-record-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink],
  templateUrl: './work-record-page.html',
  styleUrl: './work-record-page.scss',
  encapsulation: ViewEncapsulation.None,
})
export class WorkRecordPage {
  private readonly api = inject(WorkApi);
  readonly id = input.required<string>();
  private readonly record = rxResource({ params: () => Number(this.id()), stream: ({ params: id }) => this.api.get(id) });
  protected readonly order = computed<WorkOrderDetail | null>(() => (this.record.hasValue() ? this.record.value() : null));
  protected readonly error = computed(() => {
    const err = this.record.error();
    return err ? errorText(err) : null;
  });
  protected readonly statusText = STATUS_TEXT;
  protected readonly priorityText = PRIORITY_TEXT;
  protected readonly partText: Record<string, string | undefined> = PART_TEXT;
  protected readonly eventText: Record<string, string | undefined> = EVENT_TEXT;
  protected readonly conditionText: Record<string, string | undefined> = CONDITION_TEXT;
  protected readonly fmtDate = formatDate;
  protected readonly fmtTime = formatDateTime;
  protected readonly printedAt = new Date().toISOString();

  protected print(): void {
    window.print();
  }

  protected result(s: WorkStep): string {
    if (s.resultValue === null) return s.doneAt ? 'confirmed' : '';
    return `${Number(s.resultValue.toFixed(3))} ${STEP_UNIT_TEXT[s.resultUnit ?? ''] ?? s.resultUnit ?? ''}`;
  }

  protected gateLine(s: WorkStep): string {
    const g = s.gateSnapshot;
    if (!g) return '';
    if (g.manual) return 'Opened on a MANUAL CHECK (live data stale)';
    const parts = g.conditions
      .filter((c) => typeof c.value === 'number' && (c.name === 'coolant-temperature' || c.name === 'coolant-pressure'))
      .map((c) => `${CONDITION_TEXT[c.name]}: ${Number(c.value).toFixed(1)} ${c.unit}`);
    return `Opening check clear at ${formatDateTime(g.at)}${parts.length ? ` (${parts.join('; ')})` : ''}`;
  }
}
