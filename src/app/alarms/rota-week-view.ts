import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { RotaDay, WeekShift } from './rota-week';

/** One site's week of on-call shifts: a 24-hour bar per day, uncovered hours hatched and named, overlaps written out. */
@Component({
  selector: 'jw-rota-week-view',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatIconModule],
  template: `
    <div class="scale" aria-hidden="true">
      <span></span>
      <div class="ticks">
        @for (h of hours; track h) {
          <span [style.left.%]="(h / 24) * 100">{{ h < 10 ? '0' + h : h }}:00</span>
        }
      </div>
    </div>
    <ol class="days">
      @for (d of days(); track d.date) {
        <li class="day" [attr.data-date]="d.date">
          <div class="label">{{ d.label }}</div>
          <div class="bar" [style.height.px]="d.lanes * 30 + 4">
            @for (g of d.uncovered; track g.from) {
              <div class="gap" [style.left.%]="g.left" [style.width.%]="g.width" aria-hidden="true"></div>
            }
            @for (s of d.segments; track s.shift.id) {
              <button
                type="button"
                class="seg"
                [style.left.%]="s.left"
                [style.width.%]="s.width"
                [style.top.px]="2 + s.lane * 30"
                [attr.aria-label]="'Change shift: ' + s.text"
                [title]="s.text + (s.shift.backupName ? ', backup ' + s.shift.backupName : '')"
                (click)="pick.emit(s.shift)"
              >
                {{ s.text }}
              </button>
            }
          </div>
          <div class="notes">
            @for (g of d.uncovered; track g.from) {
              <span class="warn"><mat-icon aria-hidden="true" fontIcon="warning" />Uncovered {{ g.text }}</span>
            }
            @for (o of d.overlaps; track o) {
              <span class="warn"><mat-icon aria-hidden="true" fontIcon="layers" />Overlap {{ o }}</span>
            }
          </div>
        </li>
      }
    </ol>
  `,
  styles: `
    :host {
      display: block;
    }
    .scale,
    .day {
      display: grid;
      grid-template-columns: 8.5em 1fr;
      gap: 8px;
      align-items: start;
    }
    .ticks {
      position: relative;
      height: 18px;
      font-size: 12px;
      color: var(--jw-muted-text);
    }
    .ticks span {
      position: absolute;
      transform: translateX(-50%);
    }
    .ticks span:first-child {
      transform: none;
    }
    .days {
      list-style: none;
      margin: 0;
      padding: 0;
    }
    .day {
      padding: 6px 0;
      border-top: 1px solid var(--jw-band);
    }
    .label {
      font-variant-numeric: tabular-nums;
      padding-top: 6px;
    }
    .bar {
      position: relative;
      background: var(--mat-sys-surface-container-low, #f5f5f5);
      border: 1px solid var(--jw-band);
      border-radius: 4px;
      background-image: linear-gradient(to right, var(--jw-band) 1px, transparent 1px);
      background-size: calc(100% / 4) 100%;
    }
    .gap {
      position: absolute;
      top: 0;
      bottom: 0;
      background: repeating-linear-gradient(135deg, var(--jw-warning-bg) 0 6px, transparent 6px 12px);
    }
    .seg {
      position: absolute;
      height: 26px;
      box-sizing: border-box;
      overflow: hidden;
      white-space: nowrap;
      text-overflow: ellipsis;
      text-align: left;
      font: inherit;
      font-size: 13px;
      font-variant-numeric: tabular-nums;
      padding: 0 6px;
      cursor: pointer;
      border: 1px solid var(--jw-band-normal);
      border-radius: 4px;
      background: var(--mat-sys-surface, #fff);
      color: inherit;
    }
    .seg:focus-visible {
      outline: 2px solid var(--mat-sys-primary);
    }
    .notes {
      grid-column: 2;
      display: flex;
      flex-wrap: wrap;
      gap: 4px 16px;
    }
    .notes:empty {
      display: none;
    }
    .warn {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      color: var(--jw-warning);
      font-weight: 600;
      font-variant-numeric: tabular-nums;
    }
    .warn mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
    @media (max-width: 700px) {
      .scale,
      .day {
        grid-template-columns: 1fr;
      }
      .scale > span:first-child {
        display: none;
      }
      .notes {
        grid-column: 1;
      }
    }
  `,
})
export class RotaWeekView {
  readonly days = input.required<RotaDay[]>();
  readonly pick = output<WeekShift>();
  protected readonly hours = [0, 6, 12, 18];
}
