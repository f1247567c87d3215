import { JwTimePipe } from '../ui/time-format';
import { ChangeDetectionStrategy, Component, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { forkJoin, of, catchError } from 'rxjs';
import { toMillis } from '../fleet/run-state';
import { AdminService } from './admin.service';
import { Device, DeviceRejection, DeviceWithSecret, Engine, IngestReport } from './admin-types';
import { ConfirmDialog } from './confirm-dialog';
import { DeviceDialog } from './device-dialog';
import { MetricMapDialog } from './metric-map-dialog';
import { SecretDialog, SecretData } from './secret-dialog';
import { filterAdminTable, linkAdminTable } from './admin-table';

/** Reject reasons of the MQTT contract, in words. */
export const REASON_TEXT: Record<string, string> = {
  not_json: 'not JSON',
  too_large: 'too large',
  schema: 'wrong shape',
  not_finite: 'not a number',
  future_timestamp: 'time in the future',
  old_timestamp: 'time too old',
  unknown_channel: 'unknown channel',
  bad_unit: 'unit not accepted',
  wrong_topic: 'wrong topic',
  out_of_range: 'outside the physical range',
  sparkplug_decode: 'not Sparkplug B',
  sparkplug_unknown_alias: 'unknown alias (rebirth asked)',
  sparkplug_seq_gap: 'sequence gap',
  sparkplug_not_born: 'data before birth',
  sparkplug_stale_death: 'death of an old session',
  sparkplug_type: 'wrong data type',
};

interface DeviceRow extends Device {
  engineName: string;
  status: 'active' | 'revoked';
  lastSeen: number | null;
  rejected: number;
  reasons: string;
  sparkplugText: string;
  mappedNames: number;
  lastRejection: string;
  /** MQTT connects refused for a wrong secret (reason `login_failed`), not messages. */
  failedLogins: number;
  lastFailedLogin: number | null;
}

/** Counted per device by the broker; shown in its own column, apart from refused messages. */
const LOGIN_FAILED = 'login_failed';

/** The MQTT identities gateways report with: one engine each; secrets shown once, rotated or revoked here. */
@Component({
  selector: 'jw-devices-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatTooltipModule,
    JwTimePipe,
  ],
  template: `
    <div class="bar">
      <mat-form-field class="filter" subscriptSizing="dynamic">
        <mat-label>Filter devices</mat-label>
        <mat-icon matPrefix fontIcon="search" />
        <input matInput (input)="filter($any($event.target).value)" />
      </mat-form-field>
      <span class="spacer"></span>
      <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Refresh counts</button>
      <button mat-flat-button type="button" (click)="add()" [disabled]="!engines().length"><mat-icon fontIcon="add" />Add device</button>
    </div>
    @if (error(); as e) {
      <p class="load-error" role="alert">
        {{ e }} <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Retry</button>
      </p>
    }
    <div class="table-wrap">
      <table mat-table [dataSource]="source" matSort matSortActive="username" matSortDirection="asc" aria-label="Devices">
        <ng-container matColumnDef="username">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>User name</th>
          <td mat-cell *matCellDef="let d">
            <code>{{ d.username }}</code>
          </td>
        </ng-container>
        <ng-container matColumnDef="engineName">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Engine</th>
          <td mat-cell *matCellDef="let d">{{ d.engineName }}</td>
        </ng-container>
        <ng-container matColumnDef="sparkplugText">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Sparkplug B</th>
          <td mat-cell *matCellDef="let d">
            @if (d.sparkplug; as sp) {
              <code>{{ sp.groupId }} / {{ sp.edgeNodeId }}{{ sp.deviceId ? ' / ' + sp.deviceId : '' }}</code>
              <div class="muted">{{ d.mappedNames ? d.mappedNames + ' mapped name' + (d.mappedNames === 1 ? '' : 's') : 'channel keys as names' }}</div>
            } @else {
              <span class="muted">JSON topics</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="status">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Status</th>
          <td mat-cell *matCellDef="let d">
            @if (d.status === 'revoked') {
              <span class="status off"><mat-icon aria-hidden="true" fontIcon="block" />Revoked {{ d.revokedAt | jwTime: null : 'date' }}</span>
            } @else {
              <span class="status"><mat-icon aria-hidden="true" fontIcon="check_circle_outline" />Active</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="lastSeen">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Last seen</th>
          <td mat-cell *matCellDef="let d" class="jw-num">
            @if (d.lastSeen) {
              {{ d.lastSeen | jwTime: null : 'datetime-s' }}
            } @else {
              <span class="muted">never</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="rejected">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Refused messages</th>
          <td mat-cell *matCellDef="let d" class="num jw-num" [class.attention]="d.rejected > 0">{{ d.rejected }}</td>
        </ng-container>
        <ng-container matColumnDef="failedLogins">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Failed logins</th>
          <td mat-cell *matCellDef="let d" class="num jw-num" [class.attention]="d.failedLogins > 0">
            {{ d.failedLogins }}
            @if (d.lastFailedLogin) {
              <span class="sub">latest {{ d.lastFailedLogin | jwTime: null : 'datetime-s' }}</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="reasons">
          <th mat-header-cell *matHeaderCellDef>Why refused</th>
          <td mat-cell *matCellDef="let d" [matTooltip]="d.lastRejection" [matTooltipDisabled]="!d.lastRejection">
            @if (d.reasons) {
              {{ d.reasons }}
            } @else {
              <span class="muted">none</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="actions">
          <th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let d" class="actions">
            @if (d.sparkplug) {
              <button mat-button type="button" (click)="editNames(d)" [disabled]="d.status === 'revoked'">Metric names</button>
            }
            <button mat-button type="button" (click)="rotate(d)" [disabled]="d.status === 'revoked'">New secret</button>
            <button mat-button type="button" (click)="revoke(d)" [disabled]="d.status === 'revoked'">Revoke</button>
          </td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
        <tr class="mat-mdc-row" *matNoDataRow>
          <td class="mat-mdc-cell empty" [attr.colspan]="columns.length">No devices match.</td>
        </tr>
      </table>
    </div>
    <mat-paginator [pageSize]="25" [pageSizeOptions]="[10, 25, 100]" aria-label="Pages of devices" />
  `,
  styleUrl: './admin-table.scss',
})
export class DevicesPage {
  private readonly api = inject(AdminService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  protected readonly columns = ['username', 'engineName', 'sparkplugText', 'status', 'lastSeen', 'failedLogins', 'rejected', 'reasons', 'actions'];
  protected readonly source = new MatTableDataSource<DeviceRow>([]);
  protected readonly engines = signal<Engine[]>([]);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    linkAdminTable(this.source, this.sort, this.paginator, (d) => `${d.username} ${d.engineName} ${d.sparkplugText} ${d.status} ${d.reasons}`);
    this.load();
  }

  protected filter(text: string): void {
    filterAdminTable(this.source, text);
  }

  protected add(): void {
    this.dialog
      .open(DeviceDialog, { data: this.engines() })
      .afterClosed()
      .subscribe((d) => {
        if (!d) return;
        this.showSecret(d, 'Device added');
        this.load();
      });
  }

  protected editNames(d: DeviceRow): void {
    this.dialog
      .open(MetricMapDialog, { data: d, width: '820px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((saved) => {
        if (!saved) return;
        this.snack.open(`Metric names of ${d.username} saved; the gateway is asked for new birth certificates.`, undefined, { duration: 5000 });
        this.load();
      });
  }

  protected rotate(d: DeviceRow): void {
    this.confirm(`New secret for ${d.username}?`, 'The old secret stops working at once: the gateway must get the new one.', 'Make new secret', () =>
      this.api.rotateDevice(d.id).subscribe({
        next: (res) => {
          this.showSecret(res, 'New secret');
          this.load();
        },
        error: () => this.snack.open('No new secret was made.', 'Close'),
      }),
    );
  }

  protected revoke(d: DeviceRow): void {
    this.confirm(`Revoke ${d.username}?`, 'The gateway can no longer connect. This cannot be undone; add a new device to report again.', 'Revoke', () =>
      this.api.revokeDevice(d.id).subscribe({
        next: () => {
          this.snack.open(`${d.username} revoked.`, undefined, { duration: 4000 });
          this.load();
        },
        error: () => this.snack.open('The device could not be revoked.', 'Close'),
      }),
    );
  }

  protected load(): void {
    const noReport: IngestReport = { counters: null, rejections: [] };
    forkJoin([this.api.devices(), this.api.engines(), this.api.ingest().pipe(catchError(() => of(noReport)))]).subscribe({
      next: ([devices, engines, report]) => {
        this.error.set(null);
        this.engines.set(engines);
        this.source.data = toRows(devices, engines, report.rejections ?? []);
      },
      error: () => this.error.set('The devices could not be loaded.'),
    });
  }

  private showSecret(d: DeviceWithSecret, title: string): void {
    const engine = this.engines().find((e) => e.id === d.engineId);
    const data: SecretData = {
      title,
      what: `MQTT password for the gateway of ${engine?.name ?? 'engine ' + d.engineId}.`,
      username: d.username,
      secret: d.secret,
    };
    this.dialog.open(SecretDialog, { data, disableClose: true });
  }

  private confirm(title: string, message: string, confirm: string, then: () => void): void {
    this.dialog
      .open(ConfirmDialog, { data: { title, message, confirm } })
      .afterClosed()
      .subscribe((ok) => ok && then());
  }
}

export function toRows(devices: Device[], engines: Engine[], rejections: DeviceRejection[]): DeviceRow[] {
  const names = new Map(engines.map((e) => [e.id, e.name]));
  return devices.map((d) => {
    const mine = rejections.filter((r) => r.deviceId === d.id);
    const logins = mine.find((r) => r.reason === LOGIN_FAILED);
    const own = mine.filter((r) => r.reason !== LOGIN_FAILED).sort((a, b) => b.count - a.count);
    const newest = own.slice().sort((a, b) => (toMillis(b.lastAt) ?? 0) - (toMillis(a.lastAt) ?? 0))[0];
    return {
      ...d,
      engineName: names.get(d.engineId) ?? `Engine ${d.engineId}`,
      sparkplugText: d.sparkplug ? [d.sparkplug.groupId, d.sparkplug.edgeNodeId, d.sparkplug.deviceId].filter(Boolean).join(' / ') : '',
      mappedNames: Object.keys(d.metricMap ?? {}).length,
      status: d.revokedAt ? 'revoked' : 'active',
      lastSeen: toMillis(d.lastSeenAt),
      rejected: own.reduce((n, r) => n + r.count, 0),
      reasons: own.map((r) => `${REASON_TEXT[r.reason] ?? r.reason} × ${r.count}`).join(', '),
      lastRejection: newest?.lastDetail ? `Latest: ${newest.lastDetail}` : '',
      failedLogins: logins?.count ?? 0,
      lastFailedLogin: toMillis(logins?.lastAt ?? null),
    };
  });
}
