import { DOCUMENT } from '@angular/common';
import { ChangeDetectionStrategy, Component, ViewEncapsulation, computed, effect, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { Title } from '@angular/platform-browser';
import { RouterLink } from '@angular/router';
import { PreferencesService } from '../core/preferences.service';
import { STATUS_TEXT, formatDateTime } from '../work/work-labels';
import { errorText } from '../work/work-api';
import { DisplayQuantity, formatStored } from '../ui/unit-format';
import { historyRows, historyToCsv, partText, testDecision, testReadings } from './engine-history-csv';
import { EngineHistory } from './engine-history-types';
import { EngineHistoryService } from './engine-history.service';
import { downloadText } from './readings-csv';

/**
 * An engine's service history: work orders, coolant tests, run-hours corrections and service events,
 * newest first; laid out for paper (`window.print()`), and the same rows as CSV.
 */
@Component({
  selector: 'jw-engine-history-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, RouterLink],
  templateUrl: './engine-history-page.html',
  styleUrl: './engine-history-page.scss',
  // not encapsulated: the print rules also hide the app shell around this page
  encapsulation: ViewEncapsulation.None,
  // printing from the browser menu also stamps the print date
  host: { '(window:beforeprint)': 'stampPrintDate()' },
})
export class EngineHistoryPage {
  private readonly api = inject(EngineHistoryService);
  private readonly prefs = inject(PreferencesService);
  private readonly document = inject(DOCUMENT);
  private readonly title = inject(Title);
  readonly id = input.required<string>();

  /** A new engine id asks again (and cancels the request still loading). */
  private readonly record = rxResource({ params: () => Number(this.id()), stream: ({ params: id }) => this.api.history(id) });
  protected readonly history = computed<EngineHistory | null>(() => (this.record.hasValue() ? this.record.value() : null));
  protected readonly error = computed(() => {
    const err = this.record.error();
    return err ? errorText(err) : null;
  });
  protected readonly units = computed(() => this.prefs.preferences());
  protected readonly rows = computed(() => {
    const h = this.history();
    return h ? historyRows(h, this.units()) : [];
  });
  protected readonly statusText: Record<string, string | undefined> = STATUS_TEXT;
  protected readonly fmtTime = formatDateTime;
  protected readonly partText = partText;
  protected readonly readings = testReadings;
  protected readonly decision = testDecision;
  protected readonly printedAt = signal(new Date().toISOString());

  constructor() {
    effect(() => {
      const h = this.history();
      if (h) this.title.setTitle(`Service history: ${h.engine.name} · Jacketwatch`);
    });
  }

  protected fmt(value: number, quantity: DisplayQuantity): string {
    return formatStored(value, quantity, this.units());
  }

  protected stampPrintDate(): void {
    this.printedAt.set(new Date().toISOString());
  }

  protected print(): void {
    this.stampPrintDate();
    window.print();
  }

  protected exportCsv(): void {
    const h = this.history();
    if (!h) return;
    const day = new Date().toISOString().slice(0, 10);
    downloadText(this.document, `service-history-engine-${h.engine.id}-${day}.csv`, historyToCsv(this.rows()));
  }
}
