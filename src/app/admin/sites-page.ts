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
import { forkJoin } from 'rxjs';
import { AdminService } from './admin.service';
import { Site } from './admin-types';
import { ConfirmDialog } from './confirm-dialog';
import { SiteDialog } from './site-dialog';
import { filterAdminTable, linkAdminTable } from './admin-table';
import { UnitValuePipe } from '../ui/unit-value.pipe';

interface SiteRow extends Site {
  engines: number;
}

/** Places with engines, each in its own time zone. Retired, not deleted: readings and records stay. */
@Component({
  selector: 'jw-sites-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatSortModule, MatPaginatorModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, UnitValuePipe],
  template: `
    <div class="bar">
      <mat-form-field class="filter" subscriptSizing="dynamic">
        <mat-label>Filter sites</mat-label>
        <mat-icon matPrefix fontIcon="search" />
        <input matInput (input)="filter($any($event.target).value)" />
      </mat-form-field>
      <span class="spacer"></span>
      <button mat-flat-button type="button" (click)="open(null)"><mat-icon fontIcon="add_location_alt" />Add site</button>
    </div>
    @if (error(); as e) {
      <p class="load-error" role="alert">
        {{ e }} <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Retry</button>
      </p>
    }
    <div class="table-wrap">
      <table mat-table [dataSource]="source" matSort matSortActive="name" matSortDirection="asc" aria-label="Sites">
        <ng-container matColumnDef="name">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Name</th>
          <td mat-cell *matCellDef="let s">{{ s.name }}</td>
        </ng-container>
        <ng-container matColumnDef="timeZone">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Time zone</th>
          <td mat-cell *matCellDef="let s">{{ s.timeZone }}</td>
        </ng-container>
        <ng-container matColumnDef="designLowTempC">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Lowest expected</th>
          <td mat-cell *matCellDef="let s" class="num jw-num" data-test="design-low-cell">
            @if (s.designLowTempC === null || s.designLowTempC === undefined) {
              <span class="muted">not set</span>
            } @else {
              {{ s.designLowTempC | unitValue: 'temperature' }}
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="engines">
          <th mat-header-cell *matHeaderCellDef mat-sort-header arrowPosition="before" class="num">Engines</th>
          <td mat-cell *matCellDef="let s" class="num jw-num">{{ s.engines }}</td>
        </ng-container>
        <ng-container matColumnDef="actions">
          <th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let s" class="actions">
            <button mat-icon-button type="button" (click)="open(s)" [attr.aria-label]="'Change ' + s.name"><mat-icon fontIcon="edit" /></button>
            <button mat-button type="button" (click)="retire(s)">Retire</button>
          </td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns"></tr>
        <tr class="mat-mdc-row" *matNoDataRow>
          <td class="mat-mdc-cell empty" [attr.colspan]="columns.length">No sites match.</td>
        </tr>
      </table>
    </div>
    <mat-paginator [pageSize]="25" [pageSizeOptions]="[10, 25, 100]" aria-label="Pages of sites" />
  `,
  styleUrl: './admin-table.scss',
})
export class SitesPage {
  private readonly api = inject(AdminService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  protected readonly columns = ['name', 'timeZone', 'designLowTempC', 'engines', 'actions'];
  protected readonly source = new MatTableDataSource<SiteRow>([]);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    linkAdminTable(this.source, this.sort, this.paginator, (s) => `${s.name} ${s.timeZone}`);
    this.load();
  }

  protected filter(text: string): void {
    filterAdminTable(this.source, text);
  }

  protected open(site: Site | null): void {
    this.dialog
      .open(SiteDialog, { data: site })
      .afterClosed()
      .subscribe((s) => {
        if (!s) return;
        this.snack.open(site ? 'Site changed.' : 'Site added.', undefined, { duration: 4000 });
        this.load();
      });
  }

  protected retire(site: SiteRow): void {
    const message = site.engines
      ? `It still has ${site.engines} engine(s); they keep their records. Retired sites leave the lists.`
      : 'Retired sites leave the lists; their records stay.';
    this.dialog
      .open(ConfirmDialog, { data: { title: `Retire ${site.name}?`, message, confirm: 'Retire' } })
      .afterClosed()
      .subscribe((ok) => {
        if (!ok) return;
        this.api.retireSite(site.id).subscribe({
          next: () => {
            this.snack.open(`${site.name} retired.`, undefined, { duration: 4000 });
            this.load();
          },
          error: () => this.snack.open('The site could not be retired.', 'Close'),
        });
      });
  }

  protected load(): void {
    forkJoin([this.api.sites(), this.api.engines()]).subscribe({
      next: ([sites, engines]) => {
        this.error.set(null);
        this.source.data = sites.map((s) => ({ ...s, engines: engines.filter((e) => e.siteId === s.id).length }));
      },
      error: () => this.error.set('The sites could not be loaded.'),
    });
  }
}
