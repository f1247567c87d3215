import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { formatTime } from './alarm-labels';
import { AlarmsAdminService, CaughtMail, OutboxItem } from './alarms-admin.service';
import { errorText } from './alarms-api';

/** What the mail catcher received (newest first, with the text) and the outbox: sent, waiting or failing. */
@Component({
  selector: 'jw-mail-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatExpansionModule, MatTableModule, MatButtonModule, MatIconModule, RouterLink],
  template: `
    <section class="page">
      <header class="head">
        <h1>Alarm mail</h1>
        <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Refresh</button>
      </header>
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }

      <h2>Received by the mail catcher</h2>
      <mat-accordion multi>
        @for (m of mail(); track m.id) {
          <mat-expansion-panel>
            <mat-expansion-panel-header>
              <mat-panel-title>{{ m.subject }}</mat-panel-title>
              <mat-panel-description
                ><span class="to">to {{ m.to }}</span
                ><span class="jw-num">{{ time(m.receivedAt) }}</span></mat-panel-description
              >
            </mat-expansion-panel-header>
            <p class="meta">From {{ m.from }} to {{ m.to }}, received {{ time(m.receivedAt) }}</p>
            <pre class="text">{{ m.text }}</pre>
          </mat-expansion-panel>
        } @empty {
          <p class="muted">No messages yet.</p>
        }
      </mat-accordion>

      <h2>Outbox</h2>
      <table mat-table [dataSource]="outbox()">
        <ng-container matColumnDef="state"
          ><th mat-header-cell *matHeaderCellDef>State</th>
          <td mat-cell *matCellDef="let o">
            <span class="ostate" [class.failing]="!o.sentAt && o.lastError">
              <mat-icon aria-hidden="true" [fontIcon]="o.sentAt ? 'done' : o.lastError ? 'error_outline' : 'schedule'" />
              {{ o.sentAt ? 'Sent' : o.lastError ? 'Failing, will retry' : 'Waiting' }}
            </span>
          </td></ng-container
        >
        <ng-container matColumnDef="to"
          ><th mat-header-cell *matHeaderCellDef>To</th>
          <td mat-cell *matCellDef="let o">{{ o.to }}</td></ng-container
        >
        <ng-container matColumnDef="subject"
          ><th mat-header-cell *matHeaderCellDef>Subject</th>
          <td mat-cell *matCellDef="let o">{{ o.subject }}</td></ng-container
        >
        <ng-container matColumnDef="alarm"
          ><th mat-header-cell *matHeaderCellDef>Alarm</th>
          <td mat-cell *matCellDef="let o">
            @if (o.alarmId) {
              <a [routerLink]="['/alarms', o.alarmId]">#{{ o.alarmId }}</a>
            }
          </td></ng-container
        >
        <ng-container matColumnDef="when"
          ><th mat-header-cell *matHeaderCellDef>Sent / next try</th>
          <td mat-cell *matCellDef="let o" class="jw-num">
            {{ o.sentAt ? time(o.sentAt) : time(o.nextAttemptAt) }} · {{ o.attempts }} {{ o.attempts === 1 ? 'try' : 'tries' }}
          </td></ng-container
        >
        <ng-container matColumnDef="error"
          ><th mat-header-cell *matHeaderCellDef>Last error</th>
          <td mat-cell *matCellDef="let o">{{ o.lastError }}</td></ng-container
        >
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
      </table>
      @if (!outbox().length) {
        <p class="muted">The outbox is empty.</p>
      }
    </section>
  `,
  styles: `
    .page {
      padding: 16px 24px 32px;
      max-width: 1200px;
    }
    .head {
      display: flex;
      align-items: center;
      gap: 16px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
      margin: 0;
      flex: 1;
    }
    h2 {
      font: var(--mat-sys-title-medium);
      margin: 24px 0 8px;
    }
    /* subjects are long: let the header grow and wrap instead of clipping lines at tablet width */
    mat-accordion {
      --mat-expansion-header-collapsed-state-height: auto;
      --mat-expansion-header-expanded-state-height: auto;
    }
    mat-expansion-panel-header {
      padding-top: 10px;
      padding-bottom: 10px;
    }
    mat-panel-title {
      flex: 3 1 0;
    }
    mat-panel-description {
      flex: 2 1 0;
      display: flex;
      flex-wrap: wrap;
      justify-content: space-between;
      gap: 4px 16px;
    }
    th {
      white-space: nowrap;
    }
    .meta,
    .muted {
      color: var(--jw-muted-text);
    }
    .text {
      white-space: pre-wrap;
      font: inherit;
      margin: 0;
    }
    table {
      width: 100%;
    }
    .ostate {
      display: inline-flex;
      align-items: center;
      gap: 4px;
    }
    .ostate.failing {
      color: var(--jw-warning);
      font-weight: 700;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class MailPage {
  private readonly api = inject(AlarmsAdminService);
  protected readonly mail = signal<CaughtMail[]>([]);
  protected readonly outbox = signal<OutboxItem[]>([]);
  protected readonly error = signal<string | null>(null);
  protected readonly columns = ['state', 'to', 'subject', 'alarm', 'when', 'error'];

  constructor() {
    void this.load();
  }

  protected time(t: string): string {
    return formatTime(t);
  }

  protected async load(): Promise<void> {
    try {
      const [mail, outbox] = await Promise.all([firstValueFrom(this.api.caughtMail()), firstValueFrom(this.api.outbox())]);
      this.mail.set(mail);
      this.outbox.set(outbox);
      this.error.set(null);
    } catch (err) {
      this.error.set(errorText(err, 'The mail could not be loaded'));
    }
  }
}
