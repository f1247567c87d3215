import { ChangeDetectionStrategy, Component, computed, effect, input, viewChild } from '@angular/core';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { CHANNELS, ChannelKey } from '../../../shared/channels';
import { JwTimePipe } from '../ui/time-format';
import { UnitValuePipe } from '../ui/unit-value.pipe';

/** One reading as it arrived, in stored units. */
export interface RecentReading {
  t: number;
  channel: ChannelKey;
  value: number;
  quality: number;
}

/** The newest readings of the engine, newest first, each with its quality in words. */
@Component({
  selector: 'jw-recent-readings',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatPaginatorModule, JwTimePipe, UnitValuePipe],
  template: `
    <table mat-table [dataSource]="source" class="readings" aria-label="Recent readings">
      <ng-container matColumnDef="t">
        <th mat-header-cell *matHeaderCellDef>Time</th>
        <td mat-cell *matCellDef="let r" class="jw-num">{{ r.t | jwTime: zone() : 'datetime-s' }}</td>
      </ng-container>
      <ng-container matColumnDef="channel">
        <th mat-header-cell *matHeaderCellDef>Channel</th>
        <td mat-cell *matCellDef="let r">{{ label(r.channel) }}</td>
      </ng-container>
      <ng-container matColumnDef="value">
        <th mat-header-cell *matHeaderCellDef class="num">Value</th>
        <td mat-cell *matCellDef="let r" class="num jw-num">{{ r.value | unitValue: r.channel }}</td>
      </ng-container>
      <ng-container matColumnDef="quality">
        <th mat-header-cell *matHeaderCellDef>Quality</th>
        <td mat-cell *matCellDef="let r" [class.bad]="r.quality !== 0">{{ r.quality === 0 ? 'good' : 'bad — kept out of the trend' }}</td>
      </ng-container>
      <tr mat-header-row *matHeaderRowDef="columns"></tr>
      <tr mat-row *matRowDef="let row; columns: columns"></tr>
      <tr class="mat-mdc-row" *matNoDataRow>
        <td class="mat-mdc-cell empty" [attr.colspan]="columns.length">No readings received yet.</td>
      </tr>
    </table>
    <mat-paginator [pageSize]="10" [pageSizeOptions]="[10, 25, 50]" aria-label="Pages of recent readings" />
  `,
  styles: `
    .readings {
      width: 100%;
    }
    .num {
      text-align: right;
    }
    .bad {
      color: var(--jw-warning);
      font-weight: 700;
    }
    .empty {
      padding: 12px 16px;
      color: var(--jw-muted-text);
    }
  `,
})
export class RecentReadings {
  readonly readings = input.required<readonly RecentReading[]>();
  /** The zone times are written in (the site's, or the browser's by preference). */
  readonly zone = input<string | null>(null);
  protected readonly columns = ['t', 'channel', 'value', 'quality'];
  protected readonly source = new MatTableDataSource<RecentReading>([]);
  private readonly paginator = viewChild(MatPaginator);
  private readonly rows = computed(() => this.readings().slice());

  constructor() {
    effect(() => {
      this.source.paginator = this.paginator() ?? null;
      this.source.data = this.rows();
    });
  }

  protected label(channel: ChannelKey): string {
    return CHANNELS[channel]?.label ?? channel;
  }
}
