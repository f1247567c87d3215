import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { AdditiveDecision } from '../../../shared/coolant';
import { PreferencesService } from '../core/preferences.service';
import { formatStored } from '../ui/unit-format';
import { JwQuantitiesPipe } from '../ui/quantity-text';

const STATUS: Record<AdditiveDecision['status'], { text: string; icon: string; abnormal: boolean }> = {
  low: { text: 'Additive low', icon: 'arrow_downward', abnormal: true },
  'in-range': { text: 'Additive in range', icon: 'check', abnormal: false },
  high: { text: 'Additive high', icon: 'arrow_upward', abnormal: true },
  'not-applicable': { text: 'No strip decision', icon: 'remove', abnormal: false },
};

/** An SCA decision: state in words and shape (colour only when abnormal), filter, dose in the user's unit, reasons and cautions. */
@Component({
  selector: 'jw-additive-decision',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule, JwQuantitiesPipe],
  template: `
    @if (decision(); as d) {
      <section class="decision" [class.abnormal]="status().abnormal" aria-live="polite" [attr.aria-label]="status().text">
        <p class="state">
          <mat-icon aria-hidden="true" [fontIcon]="status().icon" /><strong data-test="status">{{ status().text }}</strong>
        </p>
        <dl>
          <dt>Coolant filter</dt>
          <dd data-test="filter">
            {{ d.filter === 'charged' ? 'Charged filter' : d.filter === 'blank' ? 'Blank filter (no additive)' : 'Not decided by a strip test' }}
          </dd>
          <dt>Liquid additive to add</dt>
          <dd data-test="dose">{{ d.liquidAdditiveL > 0 ? dose() + ' (' + d.liquidAdditiveUsPints + ' US pt)' : 'None' }}</dd>
          @if (d.scaUnitsPerGal !== null) {
            <dt>Reading</dt>
            <dd>
              {{ d.scaUnitsPerGal.toFixed(2) }} units/US gal · {{ d.scaUnitsPerLitre!.toFixed(3) }} units/L (range {{ d.limits.low }} to
              {{ d.limits.high }} units/US gal)
            </dd>
          }
        </dl>
        <h4>Why</h4>
        <ul data-test="reasons">
          @for (r of d.reasons; track $index) {
            <li>{{ r | jwQuantities }}</li>
          }
        </ul>
        <ul class="cautions" aria-label="Cautions for this work">
          @for (c of d.cautions; track $index) {
            <li><mat-icon aria-hidden="true" fontIcon="warning_amber" />{{ c | jwQuantities }}</li>
          }
        </ul>
        <p class="source">Limits and dose are common practice of the trade (defaults); the engine and coolant maker's figures come first.</p>
      </section>
    }
  `,
  styles: `
    .decision {
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      padding: 8px 16px;
      margin: 12px 0;
    }
    .decision.abnormal {
      border-color: var(--jw-warning);
      background: var(--jw-warning-bg);
    }
    .state {
      display: flex;
      align-items: center;
      gap: 8px;
      font-size: 1.1rem;
      margin: 4px 0;
    }
    .abnormal .state {
      color: var(--jw-warning);
    }
    dl {
      display: grid;
      grid-template-columns: max-content 1fr;
      gap: 4px 16px;
      margin: 8px 0;
    }
    dt {
      color: var(--jw-muted-text);
    }
    dd {
      margin: 0;
    }
    h4 {
      margin: 8px 0 4px;
      font-size: 0.95rem;
    }
    .cautions {
      list-style: none;
      padding: 0;
      font-size: 0.9rem;
    }
    .cautions li {
      display: flex;
      gap: 6px;
      align-items: flex-start;
      margin: 4px 0;
    }
    .source {
      color: var(--jw-muted-text);
      font-size: 0.8rem;
    }
  `,
})
export class AdditiveDecisionView {
  private readonly prefs = inject(PreferencesService);
  readonly decision = input<AdditiveDecision | null>(null);
  protected readonly status = computed(() => STATUS[this.decision()?.status ?? 'not-applicable']);
  // doses under 0.05 L come in 5 mL steps (shared/coolant/additive.ts): one more decimal so they do not read as 0.00 or 0.02
  protected readonly dose = computed(() => {
    const l = this.decision()?.liquidAdditiveL ?? 0;
    return formatStored(l, 'volume', this.prefs.preferences(), l > 0 && l < 0.05 ? 3 : 2);
  });
}
