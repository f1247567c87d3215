import { ChangeDetectionStrategy, Component, computed, inject, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import { PreferencesService } from '../core/preferences.service';
import { formatAlarmValue, formatDuration, formatTime, needsAcknowledge, priorityLook, stateText } from './alarm-labels';
import { Alarm } from './alarm-types';

/**
 * One alarm in a list: priority as word and shape, state in words, engine and site, value with
 * its unit, when it was raised and how long ago. Waiting-for-acknowledge alarms carry a heavy
 * left bar and the word; everything else stays calm.
 */
@Component({
  selector: 'jw-alarm-row',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatButtonModule, MatIconModule, MatTooltipModule, RouterLink],
  template: `
    <article class="row" [class.unack]="unack()" [class.closed]="!!alarm().closedAt" [attr.data-priority]="alarm().priority" [attr.aria-label]="summary()">
      <div class="priority" [class]="'priority p-' + alarm().priority">
        <mat-icon aria-hidden="true" [fontIcon]="look().icon" />
        <span class="priority-text">{{ look().text }}</span>
      </div>
      <div class="main">
        <a class="title" [routerLink]="['/alarms', alarm().id]">{{ alarm().title }}</a>
        <div class="where">
          <a [routerLink]="['/engines', alarm().engineId]">{{ alarm().engineName ?? 'Engine ' + alarm().engineId }}</a>
          @if (alarm().siteName) {
            <span class="site">{{ ' · ' + alarm().siteName }}</span>
          }
        </div>
      </div>
      <div class="state">
        @if (unack()) {
          <span class="unack-mark"><mat-icon aria-hidden="true" fontIcon="radio_button_checked" />Unacknowledged</span>
          @if (alarm().state === 'returned-unacknowledged') {
            <span class="state-text">{{ ' ' }}Returned to normal</span>
          }
        } @else {
          <span class="state-text">{{ stateWords() }}</span>
        }
        @if (alarm().state === 'shelved' && alarm().shelvedUntil) {
          <span class="detail">until {{ shelvedUntil() }}</span>
        }
      </div>
      <div class="value jw-num">
        <span class="label">Value</span>
        <span class="number">{{ value() }}</span>
      </div>
      <div class="time jw-num">
        <span class="raised">{{ raised() }}</span>
        <span class="age">{{ age() }} ago</span>
      </div>
      <div class="actions">
        @if (canAcknowledge() && unack()) {
          <button mat-flat-button type="button" class="ack" (click)="acknowledge.emit(alarm())">Acknowledge</button>
        }
        @if (
          canShelve() && !alarm().closedAt && alarm().state !== 'shelved' && alarm().state !== 'out-of-service' && alarm().state !== 'suppressed-by-design'
        ) {
          <button mat-stroked-button type="button" class="shelve" (click)="shelve.emit(alarm())">Shelve</button>
        }
        @if (canShelve() && alarm().state === 'shelved') {
          <button mat-stroked-button type="button" class="unshelve" (click)="unshelve.emit(alarm())">Take off shelf</button>
        }
        @if (canNote()) {
          <button mat-icon-button type="button" class="note" (click)="note.emit(alarm())" aria-label="Add a note" matTooltip="Add a note">
            <mat-icon fontIcon="edit_note" />
          </button>
        }
      </div>
    </article>
  `,
  styleUrl: './alarm-row.scss',
})
export class AlarmRow {
  private readonly prefs = inject(PreferencesService);

  readonly alarm = input.required<Alarm>();
  /** Now, in ms; the list passes the shared clock so every age moves together. */
  readonly now = input<number>(Date.now());
  readonly canAcknowledge = input(false);
  readonly canShelve = input(false);
  readonly canNote = input(false);
  /** The zone times are written in (the site's, or the browser's by preference). */
  readonly zone = input<string | null>(null);

  readonly acknowledge = output<Alarm>();
  readonly shelve = output<Alarm>();
  readonly unshelve = output<Alarm>();
  readonly note = output<Alarm>();

  protected readonly look = computed(() => priorityLook(this.alarm().priority));
  protected readonly unack = computed(() => needsAcknowledge(this.alarm().state));
  protected readonly stateWords = computed(() => stateText(this.alarm().state));
  protected readonly value = computed(() => formatAlarmValue(this.alarm().value, this.alarm().unit, this.prefs.preferences()));
  protected readonly raised = computed(() => formatTime(this.alarm().raisedAt, this.zone()));
  // the shared clock ticks once a second and may lag a just-raised alarm: never a negative age
  protected readonly age = computed(() => formatDuration(Math.max(0, this.now() - Date.parse(this.alarm().raisedAt))));
  protected readonly shelvedUntil = computed(() => formatTime(this.alarm().shelvedUntil, this.zone()));

  protected readonly summary = computed(() => {
    const a = this.alarm();
    return [
      `${this.look().text} priority`,
      a.title,
      a.engineName ?? `Engine ${a.engineId}`,
      a.siteName,
      stateText(a.state),
      `value ${this.value()}`,
      `raised ${this.age()} ago`,
    ]
      .filter(Boolean)
      .join(', ');
  });
}
