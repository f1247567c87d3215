import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { ChannelKey } from '../../../shared/channels';
import { BandPosition, NormalBand, bandPosition } from '../../../shared/normal-bands';
import { PreferencesService } from '../core/preferences.service';
import { DisplayQuantity, formatStored } from './unit-format';

const POSITION_WORD: Record<BandPosition, string> = { low: 'below normal band', normal: 'within normal band', high: 'above normal band' };
const POSITION_SHORT: Record<BandPosition, string> = { low: 'LOW', normal: '', high: 'HIGH' };

/**
 * A compact bar: the scale as a grey track, the normal band as a darker section, the value as a marker.
 * Outside the band the marker turns into an arrow pointing the way out and the word LOW or HIGH appears,
 * so the state never depends on colour alone.
 */
@Component({
  selector: 'jw-band-indicator',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: {
    role: 'img',
    '[attr.aria-label]': 'ariaLabel()',
    '[class]': '"jw-band-indicator jw-pos-" + (position() ?? "none")',
  },
  template: `
    <span class="track" aria-hidden="true">
      @if (bandSpan(); as b) {
        <span class="band" [style.left.%]="b.left" [style.width.%]="b.width"></span>
      }
      @if (markerAt() !== null) {
        <span class="marker" [class.out]="position() === 'low' || position() === 'high'" [style.left.%]="markerAt()">
          @switch (position()) {
            @case ('low') {
              <span class="arrow">◀</span>
            }
            @case ('high') {
              <span class="arrow">▶</span>
            }
          }
        </span>
      }
    </span>
    @if (shortWord()) {
      <span class="word" aria-hidden="true">{{ shortWord() }}</span>
    }
  `,
  styles: `
    :host {
      display: flex;
      align-items: center;
      gap: 6px;
      min-width: 0;
    }
    .track {
      position: relative;
      flex: 1;
      height: 8px;
      border-radius: 2px;
      background: var(--jw-band);
      min-width: 40px;
    }
    .band {
      position: absolute;
      top: 0;
      bottom: 0;
      background: var(--jw-band-normal);
    }
    .marker {
      position: absolute;
      top: -4px;
      width: 3px;
      height: 16px;
      margin-left: -1.5px;
      background: var(--jw-marker);
      border-radius: 1px;
    }
    .marker.out {
      background: var(--jw-warning);
      width: 4px;
      margin-left: -2px;
    }
    .arrow {
      position: absolute;
      top: -1px;
      font-size: 12px;
      line-height: 16px;
      color: var(--jw-warning);
    }
    :host(.jw-pos-low) .arrow {
      right: 5px;
    }
    :host(.jw-pos-high) .arrow {
      left: 5px;
    }
    .word {
      font-size: 11px;
      font-weight: 700;
      letter-spacing: 0.04em;
      color: var(--jw-warning);
    }
  `,
})
export class BandIndicator {
  private readonly prefs = inject(PreferencesService);

  /** Stored SI value; null when there is none. */
  readonly value = input<number | null | undefined>(null);
  /** Normal band in stored units; null when the state has none. */
  readonly band = input<NormalBand | null | undefined>(null);
  /** The range the bar spans, in stored units. */
  readonly scale = input.required<NormalBand>();
  /** The channel or quantity, for units in the accessible label. */
  readonly quantity = input.required<ChannelKey | DisplayQuantity>();
  /** What is measured, e.g. "Coolant temperature". */
  readonly label = input.required<string>();

  protected readonly position = computed<BandPosition | null>(() => {
    const v = this.value();
    const b = this.band();
    return v == null || !Number.isFinite(v) || !b ? null : bandPosition(v, b);
  });

  protected readonly shortWord = computed(() => {
    const p = this.position();
    return p ? POSITION_SHORT[p] : '';
  });

  protected readonly bandSpan = computed(() => {
    const b = this.band();
    if (!b) return null;
    const left = this.percent(b.low);
    return { left, width: Math.max(this.percent(b.high) - left, 1) };
  });

  protected readonly markerAt = computed(() => {
    const v = this.value();
    return v == null || !Number.isFinite(v) ? null : this.percent(v);
  });

  protected readonly ariaLabel = computed(() => {
    const prefs = this.prefs.preferences();
    const what = this.quantity();
    const v = this.value();
    const b = this.band();
    const valueText = v == null || !Number.isFinite(v) ? 'no value' : formatStored(v, what, prefs);
    if (!b) return `${this.label()}: ${valueText}; no normal band for this state`;
    const bandText = `${formatStored(b.low, what, prefs)} to ${formatStored(b.high, what, prefs)}`;
    const p = this.position();
    return p ? `${this.label()}: ${valueText}, ${POSITION_WORD[p]} ${bandText}` : `${this.label()}: ${valueText}; normal band ${bandText}`;
  });

  private percent(v: number): number {
    const s = this.scale();
    const span = s.high - s.low;
    if (span <= 0) return 0;
    return Math.min(100, Math.max(0, ((v - s.low) / span) * 100));
  }
}
