import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { ChemistryFinding } from '../../../shared/coolant';
import { fromCelsius, UNIT_SYMBOL } from '../../../shared/units';
import { PreferencesService } from '../core/preferences.service';

const LABEL: Record<ChemistryFinding['field'], string> = {
  nitritePpm: 'Nitrite',
  molybdatePpm: 'Molybdate',
  ph: 'pH',
  reserveAlkalinityMl: 'Reserve alkalinity',
  freezeProtection: 'Freeze protection',
  breakdownSigns: 'Glycol breakdown',
};
const STATUS: Record<ChemistryFinding['status'], { text: string; icon: string; abnormal: boolean }> = {
  ok: { text: 'In range', icon: 'check', abnormal: false },
  low: { text: 'Low', icon: 'arrow_downward', abnormal: true },
  high: { text: 'High', icon: 'arrow_upward', abnormal: true },
  short: { text: 'Short of the design low', icon: 'ac_unit', abnormal: true },
  unknown: { text: 'Not judged', icon: 'help_outline', abnormal: false },
  signs: { text: 'Signs seen', icon: 'report', abnormal: true },
};
const UNIT: Record<ChemistryFinding['field'], string> = {
  nitritePpm: 'ppm',
  molybdatePpm: 'ppm',
  ph: '',
  reserveAlkalinityMl: 'mL',
  freezeProtection: '',
  breakdownSigns: '',
};

/** The judgement of each measured chemistry field: state in words and shape (colour only when abnormal), finding, action, source. */
@Component({
  selector: 'jw-chemistry-findings',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    @if (rows().length) {
      <ul class="findings" aria-label="Coolant chemistry findings">
        @for (r of rows(); track r.f.field) {
          <li [class.abnormal]="r.s.abnormal" [attr.data-test]="'finding-' + r.f.field">
            <p class="head">
              <mat-icon aria-hidden="true" [fontIcon]="r.s.icon" />
              <strong>{{ r.label }}: {{ r.s.text }}</strong>
              @if (r.value) {
                <span class="value">{{ r.value }}</span>
              }
            </p>
            <p class="message">{{ r.f.message }}</p>
            <p class="action"><span class="tag">Action</span> {{ r.f.action }}</p>
            <p class="source">Limit: {{ r.f.source }}.</p>
          </li>
        }
      </ul>
    }
  `,
  styles: `
    .findings {
      list-style: none;
      padding: 0;
      margin: 8px 0;
    }
    li {
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      padding: 6px 12px;
      margin: 6px 0;
    }
    li.abnormal {
      border-color: var(--jw-warning);
      background: var(--jw-warning-bg);
    }
    .head {
      display: flex;
      align-items: center;
      gap: 8px;
      margin: 2px 0;
    }
    .abnormal .head {
      color: var(--jw-warning);
    }
    .value {
      color: var(--jw-muted-text);
      font-variant-numeric: tabular-nums;
    }
    .message,
    .action {
      margin: 2px 0;
    }
    .tag {
      font-weight: 600;
      font-size: 0.8rem;
      margin-right: 4px;
    }
    .source {
      color: var(--jw-muted-text);
      font-size: 0.8rem;
      margin: 2px 0;
    }
  `,
})
export class ChemistryFindings {
  private readonly prefs = inject(PreferencesService);
  readonly findings = input<ChemistryFinding[] | null | undefined>(null);
  protected readonly rows = computed(() =>
    (this.findings() ?? []).map((f) => {
      let value = '';
      if (f.value !== null) {
        if (f.field === 'freezeProtection') {
          const u = this.prefs.temperatureUnit();
          value = `${fromCelsius(f.value, u).toFixed(1)} ${UNIT_SYMBOL[u]}`;
        } else value = `${f.value}${UNIT[f.field] ? ' ' + UNIT[f.field] : ''}`;
      }
      return { f, s: STATUS[f.status], label: LABEL[f.field], value };
    }),
  );
}
