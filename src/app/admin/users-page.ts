import { JwTimePipe } from '../ui/time-format';
import { ChangeDetectionStrategy, Component, computed, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { AuthService } from '../core/auth.service';
import { Role } from '../core/user';
import { AdminService } from './admin.service';
import { AdminUser, ROLES, ROLE_LABEL } from './admin-types';
import { ConfirmDialog } from './confirm-dialog';
import { applyServerError } from './form-errors';
import { UserDialog, UserDialogData } from './user-dialog';
import { FormGroup } from '@angular/forms';
import { filterAdminTable, linkAdminTable } from './admin-table';

/** Who may sign in, with which role. Users are disabled, never deleted: their names stay on their records. */
@Component({
  selector: 'jw-users-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatSortModule, MatPaginatorModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, MatMenuModule, JwTimePipe],
  template: `
    <div class="bar">
      <mat-form-field class="filter" subscriptSizing="dynamic">
        <mat-label>Filter users</mat-label>
        <mat-icon matPrefix fontIcon="search" />
        <input matInput (input)="filter($any($event.target).value)" />
      </mat-form-field>
      <span class="spacer"></span>
      <button mat-flat-button type="button" (click)="add()"><mat-icon fontIcon="person_add" />Add user</button>
    </div>
    @if (error(); as e) {
      <p class="load-error" role="alert">
        {{ e }} <button mat-stroked-button type="button" (click)="load()"><mat-icon fontIcon="refresh" />Retry</button>
      </p>
    }
    <div class="table-wrap">
      <table mat-table [dataSource]="source" matSort matSortActive="name" matSortDirection="asc" aria-label="Users">
        <ng-container matColumnDef="name">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Name</th>
          <td mat-cell *matCellDef="let u">
            {{ u.name }}
            @if (u.id === me()) {
              <span class="muted">(you)</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="email">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>E-mail</th>
          <td mat-cell *matCellDef="let u">{{ u.email }}</td>
        </ng-container>
        <ng-container matColumnDef="role">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Role</th>
          <td mat-cell *matCellDef="let u">{{ roleLabel[u.role] ?? u.role }}</td>
        </ng-container>
        <ng-container matColumnDef="sites">
          <th mat-header-cell *matHeaderCellDef>Sites</th>
          <td mat-cell *matCellDef="let u">{{ sitesText(u) }}</td>
        </ng-container>
        <ng-container matColumnDef="disabled">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Status</th>
          <td mat-cell *matCellDef="let u">
            @if (u.disabled) {
              <span class="status off"><mat-icon aria-hidden="true" fontIcon="block" />Disabled</span>
            } @else {
              <span class="status"><mat-icon aria-hidden="true" fontIcon="check_circle_outline" />Active</span>
            }
          </td>
        </ng-container>
        <ng-container matColumnDef="createdAt">
          <th mat-header-cell *matHeaderCellDef mat-sort-header>Added</th>
          <td mat-cell *matCellDef="let u" class="jw-num">{{ u.createdAt | jwTime: null : 'date' }}</td>
        </ng-container>
        <ng-container matColumnDef="actions">
          <th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let u" class="actions">
            <button mat-button type="button" [matMenuTriggerFor]="roleMenu" [disabled]="u.id === me()" [attr.aria-label]="'Change role of ' + u.name">
              Role
            </button>
            <mat-menu #roleMenu="matMenu">
              @for (r of roles; track r.value) {
                <button mat-menu-item type="button" [disabled]="r.value === u.role" (click)="setRole(u, r.value)">{{ r.label }}</button>
              }
            </mat-menu>
            <button mat-icon-button type="button" (click)="edit(u)" [attr.aria-label]="'Change ' + u.name"><mat-icon fontIcon="edit" /></button>
            <button mat-icon-button type="button" (click)="password(u)" [attr.aria-label]="'New password for ' + u.name"><mat-icon fontIcon="key" /></button>
            @if (u.disabled) {
              <button mat-button type="button" (click)="setDisabled(u, false)">Enable</button>
            } @else {
              <button mat-button type="button" (click)="setDisabled(u, true)" [disabled]="u.id === me()">Disable</button>
            }
          </td>
        </ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns" [class.muted]="row.disabled"></tr>
        <tr class="mat-mdc-row" *matNoDataRow>
          <td class="mat-mdc-cell empty" [attr.colspan]="columns.length">No users match.</td>
        </tr>
      </table>
    </div>
    <mat-paginator [pageSize]="25" [pageSizeOptions]="[10, 25, 100]" aria-label="Pages of users" />
  `,
  styleUrl: './admin-table.scss',
})
export class UsersPage {
  private readonly api = inject(AdminService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly auth = inject(AuthService);
  protected readonly me = computed(() => this.auth.user()?.id ?? null);
  protected readonly roles = ROLES;
  protected readonly roleLabel: Partial<Record<string, string>> = ROLE_LABEL;
  protected readonly columns = ['name', 'email', 'role', 'sites', 'disabled', 'createdAt', 'actions'];
  private readonly siteNames = new Map<number, string>();
  protected readonly source = new MatTableDataSource<AdminUser>([]);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);

  constructor() {
    linkAdminTable(this.source, this.sort, this.paginator, (u) => `${u.name} ${u.email} ${ROLE_LABEL[u.role]} ${u.disabled ? 'disabled' : 'active'}`);
    this.load();
  }

  /** "Every site" unless the user is limited to some (admins always see every site). */
  protected sitesText(u: AdminUser): string {
    if (u.role === 'admin' || !u.siteIds?.length) return 'Every site';
    return u.siteIds.map((id) => this.siteNames.get(id) ?? `site ${id}`).join(', ');
  }

  protected filter(text: string): void {
    filterAdminTable(this.source, text);
  }

  protected add(): void {
    this.open({ mode: 'add', user: null }, 'User added. Pass on the first password safely.');
  }
  protected edit(user: AdminUser): void {
    this.open({ mode: 'edit', user }, 'User changed.');
  }
  protected password(user: AdminUser): void {
    this.open({ mode: 'password', user }, `New password set for ${user.name}.`);
  }

  protected setRole(user: AdminUser, role: Role): void {
    this.patch(user, { role }, `${user.name} is now ${ROLE_LABEL[role]}.`);
  }

  protected setDisabled(user: AdminUser, disabled: boolean): void {
    if (!disabled) return this.patch(user, { disabled }, `${user.name} may sign in again.`);
    this.dialog
      .open(ConfirmDialog, {
        data: { title: `Disable ${user.name}?`, message: 'They can no longer sign in. Their name stays on the records they made.', confirm: 'Disable' },
      })
      .afterClosed()
      .subscribe((ok) => ok && this.patch(user, { disabled }, `${user.name} is disabled.`));
  }

  private patch(user: AdminUser, change: Partial<AdminUser>, done: string): void {
    this.api.updateUser(user.id, change).subscribe({
      next: () => {
        this.snack.open(done, undefined, { duration: 4000 });
        this.load();
      },
      error: (err) => this.snack.open(applyServerError(new FormGroup({}), err) ?? 'Refused.', 'Close'),
    });
  }

  private open(data: UserDialogData, done: string): void {
    this.dialog
      .open(UserDialog, { data, autoFocus: 'first-tabbable' })
      .afterClosed()
      .subscribe((u) => {
        if (!u) return;
        this.snack.open(done, undefined, { duration: 4000 });
        this.load();
      });
  }

  protected load(): void {
    // site names for the Sites column; the users are shown whether or not they arrive
    this.api.sites().subscribe({
      next: (sites) => {
        for (const s of sites) this.siteNames.set(s.id, s.name);
        this.source.data = [...this.source.data];
      },
      error: () => undefined,
    });
    this.api.users().subscribe({
      next: (users) => {
        this.error.set(null);
        this.source.data = users;
      },
      error: () => this.error.set('The users could not be loaded.'),
    });
  }
}
