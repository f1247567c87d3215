import { ChangeDetectionStrategy, Component, inject, signal, viewChild } from '@angular/core';
import { DecimalPipe } from '@angular/common';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { forkJoin } from 'rxjs';
import { UnitValuePipe } from '../ui/unit-value.pipe';
import { AdminService } from './admin.service';
import { Engine, Site } from './admin-types';
import { ConfirmDialog } from './confirm-dialog';
import { EngineForm, EngineFormData } from './engine-form';
import { filterAdminTable, linkAdminTable } from './admin-table';

interface EngineRow extends Engine {
  siteName: string;
}

const DUTY: Partial<Record<string, string>> = { standby: 'Standby', prime: 'Prime', continuous: 'Continuous' };
const FAMILY: Partial<Record<string, string>> = { conventional: 'Conventional', 'extended-life': 'Extended-life' };

/** The engines and their cooling systems, in the user's units; the API keeps SI. */
@Component({
  selector: 'jw-engines-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    MatTableModule,
    MatSortModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    RouterLink,
    UnitValuePipe,
    DecimalPipe,
  ],
  template: `
    <div class="bar">
      <mat-form-field class="filter" subscriptSizing="dynamic">
        <mat-label>Filter engines</mat-label>
        <mat-icon matPrefix fontIcon="search" />
        <input matInput (input)="filter($any($event.target).value)" />
      </mat-form-field>
      <span class="spacer"></span>
      <button mat-flat-button type="button" (click)="open(null)" [disabled]="!sites().length"><mat-icon fontIcon="add" />Add engine</button>
    </div>
    @if (error(); as e) {
      <p class="load-error" role="alert">
        {{ e }} <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Retry</button>
      </p>
    }
    <div class="table-wrap">
      <table mat-table [dataSource]="source" matSort matSortActive="name" matSortDirection="asc" aria-label="Engines">
        <ng-container matColumnDef="name">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Name</th>
          <td mat-cell *matCellDef="let e">
            <a [routerLink]="['/engines', e.id]">{{ e.name }}</a>
          </td>
        </ng-container>
        <ng-container matColumnDef="siteName">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Site</th>
          <td mat-cell *matCellDef="let e">{{ e.siteName }}</td>
        </ng-container>
        <ng-container matColumnDef="duty">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Duty</th>
          <td mat-cell *matCellDef="let e">{{ duty[e.duty] ?? e.duty }}</td>
        </ng-container>
        <ng-container matColumnDef="capacityL">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Capacity</th>
          <td mat-cell *matCellDef="let e" class="num jw-num">{{ e.capacityL | unitValue: 'volume' }}</td>
        </ng-container>
        <ng-container matColumnDef="coolant">
          <th mat-header-cell *matHeaderCellDef>Coolant</th>
          <td mat-cell *matCellDef="let e">{{ family[e.coolantFamily] ?? e.coolantFamily }}, {{ e.glycolPercent }} % {{ e.glycolType }}</td>
        </ng-container>
        <ng-container matColumnDef="capPressureKpa">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Cap</th>
          <td mat-cell *matCellDef="let e" class="num jw-num">{{ e.capPressureKpa | unitValue: 'pressure' }}</td>
        </ng-container>
        <ng-container matColumnDef="runHours">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Run hours</th>
          <td mat-cell *matCellDef="let e" class="num jw-num">{{ e.runHours | number: '1.0-0' }} h</td>
        </ng-container>
        <ng-container matColumnDef="outOfService">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Service</th>
          <td mat-cell *matCellDef="let e">
            @if (e.outOfService) {
              <span class="status off"><mat-icon aria-hidden="true" fontIcon="build" />Out of service</span>
            } @else {
              <span class="status">In service</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="actions">
          <th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let e" class="actions">
            <button mat-icon-button type="button" (click)="open(e)" [attr.aria-label]="'Change ' + e.name"><mat-icon fontIcon="edit" /></button>
            <button mat-button type="button" (click)="retire(e)">Retire</button>
          </td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
        <tr class="mat-mdc-row" *matNoDataRow>
          <td class="mat-mdc-cell empty" [attr.colspan]="columns.length">No engines match.</td>
        </tr>
      </table>
    </div>
    <mat-paginator [pageSize]="25" [pageSizeOptions]="[10, 25, 100]" aria-label="Pages of engines" />
  `,
  styleUrl: './admin-table.scss',
})
export class EnginesPage {
  private readonly api = inject(AdminService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  protected readonly duty = DUTY;
  protected readonly family = FAMILY;
  protected readonly columns = ['name', 'siteName', 'duty', 'capacityL', 'coolant', 'capPressureKpa', 'runHours', 'outOfService', 'actions'];
  protected readonly source = new MatTableDataSource<EngineRow>([]);
  protected readonly sites = signal<Site[]>([]);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    linkAdminTable(
      this.source,
      this.sort,
      this.paginator,
      (e) => `${e.name} ${e.siteName} ${e.duty} ${e.coolantFamily} ${e.glycolType} ${e.outOfService ? 'out of service' : ''}`,
    );
    this.load();
  }

  protected filter(text: string): void {
    filterAdminTable(this.source, text);
  }

  protected open(engine: Engine | null): void {
    const data: EngineFormData = { engine, sites: this.sites() };
    this.dialog
      .open(EngineForm, { data, width: '760px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((e) => {
        if (!e) return;
        this.snack.open(engine ? 'Engine changed.' : 'Engine added. Add a device for it so it can report.', undefined, { duration: 5000 });
        this.load();
      });
  }

  protected retire(engine: EngineRow): void {
    this.dialog
      .open(ConfirmDialog, {
        data: { title: `Retire ${engine.name}?`, message: 'It leaves the fleet board and the lists; its readings and records stay.', confirm: 'Retire' },
      })
      .afterClosed()
      .subscribe((ok) => {
        if (!ok) return;
        this.api.retireEngine(engine.id).subscribe({
          next: () => {
            this.snack.open(`${engine.name} retired.`, undefined, { duration: 4000 });
            this.load();
          },
          error: () => this.snack.open('The engine could not be retired.', 'Close'),
        });
      });
  }

  protected load(): void {
    forkJoin([this.api.sites(), this.api.engines()]).subscribe({
      next: ([sites, engines]) => {
        this.error.set(null);
        this.sites.set(sites);
        const names = new Map(sites.map((s) => [s.id, s.name]));
        this.source.data = engines.map((e) => ({ ...e, siteName: names.get(e.siteId) ?? `Site ${e.siteId}` }));
      },
      error: () => this.error.set('The engines could not be loaded.'),
    });
  }
}
