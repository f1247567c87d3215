import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { COOLANT_CAUTIONS, CoolantCautionId } from '../../../shared/coolant';

/** The shared coolant cautions (shared/coolant/cautions.ts), all or the chosen ones. */
@Component({
  selector: 'jw-coolant-cautions',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <aside class="cautions" aria-label="Cautions">
      @for (c of shown(); track c.id) {
        <p class="caution">
          <mat-icon aria-hidden="true" fontIcon="warning_amber" /><span
            ><strong>{{ c.title }}.</strong> {{ c.text }}</span
          >
        </p>
      }
    </aside>
  `,
  styles: `
    .cautions {
      border-left: 4px solid var(--jw-warning);
      padding: 4px 12px;
      margin: 12px 0;
    }
    .caution {
      display: flex;
      gap: 8px;
      align-items: flex-start;
      margin: 6px 0;
      font-size: 0.9rem;
    }
    mat-icon {
      color: var(--jw-warning);
      flex: none;
    }
  `,
})
export class CoolantCautions {
  readonly ids = input<CoolantCautionId[] | null>(null);
  protected readonly shown = computed(() => {
    const ids = this.ids();
    return ids ? COOLANT_CAUTIONS.filter((c) => ids.includes(c.id)) : COOLANT_CAUTIONS;
  });
}
