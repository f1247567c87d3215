import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { firstValueFrom } from 'rxjs';
import { AuthService } from '../core/auth.service';
import { FleetService } from '../fleet/fleet.service';
import { formatTime } from './alarm-labels';
import { errorText } from './alarms-api';
import { Person, Shift, ShiftDialog, ShiftDialogData, ShiftInput } from './shift-dialog';

/** Roles the server lets answer alarms (server/services/alarms/oncall.ts). */
const ONCALL_ROLES = ['technician', 'planner', 'admin'];

/** The on-call rota: who answers alarms for which site and when, with a backup. Planners and administrators change it. */
@Component({
  selector: 'jw-on-call-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatPaginatorModule],
  template: `
    <section class="page">
      <header class="head">
        <h1>On-call rota</h1>
        <button mat-flat-button type="button" (click)="edit(null)" [disabled]="!readyToEdit()"><mat-icon fontIcon="add" />New shift</button>
      </header>
      <p class="muted">Alarm e-mail goes to whoever is on call for the engine's site; unacknowledged alarms go on to the backup. Shifts from the past 7 days on, earliest first.</p>
      @if (error(); as e) { <p class="error" role="alert">{{ e }}</p> }
      <table mat-table [dataSource]="pageRows()">
        <ng-container matColumnDef="now"><th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Now</span></th>
          <td mat-cell *matCellDef="let s">@if (s.current) { <span class="current"><mat-icon aria-hidden="true" fontIcon="play_arrow" />On now</span> } @else if (s.past) { <span class="muted">Past</span> }
            @if (s.id === savedId()) { <span class="saved"><mat-icon aria-hidden="true" fontIcon="check" />Just saved</span> }</td></ng-container>
        <ng-container matColumnDef="site"><th mat-header-cell *matHeaderCellDef>Site</th><td mat-cell *matCellDef="let s">{{ s.siteName }}</td></ng-container>
        <ng-container matColumnDef="who"><th mat-header-cell *matHeaderCellDef>On call</th><td mat-cell *matCellDef="let s">{{ s.userName ?? 'user ' + s.userId }}</td></ng-container>
        <ng-container matColumnDef="backup"><th mat-header-cell *matHeaderCellDef>Backup</th><td mat-cell *matCellDef="let s">{{ s.backupUserName ?? (s.backupUserId ? 'user ' + s.backupUserId : 'none') }}</td></ng-container>
        <ng-container matColumnDef="from"><th mat-header-cell *matHeaderCellDef>From</th><td mat-cell *matCellDef="let s" class="jw-num">{{ time(s.startsAt) }}</td></ng-container>
        <ng-container matColumnDef="until"><th mat-header-cell *matHeaderCellDef>Until</th><td mat-cell *matCellDef="let s" class="jw-num">{{ time(s.endsAt) }}</td></ng-container>
        <ng-container matColumnDef="actions"><th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let s" class="actions">
            <button mat-icon-button type="button" (click)="edit(s)" [attr.aria-label]="'Change shift of ' + s.userName + ', ' + s.siteName + ', from ' + time(s.startsAt)"><mat-icon fontIcon="edit" /></button>
            <button mat-icon-button type="button" (click)="remove(s)" [attr.aria-label]="'Delete shift of ' + s.userName + ', ' + s.siteName + ', from ' + time(s.startsAt)"><mat-icon fontIcon="delete" /></button>
          </td></ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns" [class.past]="row.past" [attr.data-shift-id]="row.id"></tr>
      </table>
      @if (!rows().length) { <p class="muted">No shifts yet: alarm e-mail has nobody to go to.</p> }
      @else if (rows().length > pageSize) {
        <mat-paginator [length]="rows().length" [pageSize]="pageSize" [pageIndex]="pageIndex()" [hidePageSize]="true" (page)="turn($event)" aria-label="Pages of shifts" />
      }
    </section>
  `,
  styles: `
    .page { padding: 16px 24px 32px; max-width: 1200px; }
    .head { display: flex; align-items: center; gap: 16px; }
    h1 { font: var(--mat-sys-headline-small); margin: 0; flex: 1; }
    .muted { color: var(--jw-muted-text); }
    table { width: 100%; }
    tr.past { color: var(--jw-muted-text); }
    .current, .saved { display: inline-flex; align-items: center; font-weight: 700; }
    .saved { font-weight: 400; }
    .actions { text-align: right; white-space: nowrap; }
    .error { color: var(--jw-alarm-high); }
  `,
})
export class OnCallPage {
  private readonly http = inject(HttpClient);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly fleet = inject(FleetService);
  private readonly auth = inject(AuthService);

  private readonly shifts = signal<Shift[]>([]);
  private readonly users = signal<Person[] | null>(null);
  /** The people list has answered (or failed, leaving the rota's own names). */
  private readonly peopleSettled = signal(false);
  /** A new shift needs the sites and the people to choose from; a dialog opened earlier would offer a partial list. */
  protected readonly readyToEdit = computed(() => this.peopleSettled() && this.fleet.sites().length > 0);
  protected readonly error = signal<string | null>(null);
  protected readonly columns = ['now', 'site', 'who', 'backup', 'from', 'until', 'actions'];

  protected readonly rows = computed(() => {
    const sites = this.fleet.siteById();
    const now = Date.now();
    return this.shifts().map((s) => ({
      ...s,
      siteName: sites.get(s.siteId)?.name ?? `Site ${s.siteId}`,
      current: Date.parse(s.startsAt) <= now && now < Date.parse(s.endsAt),
      past: Date.parse(s.endsAt) <= now,
    }));
  });

  protected readonly pageSize = 15;
  protected readonly pageIndex = signal(0);
  protected readonly savedId = signal<number | null>(null);
  protected readonly pageRows = computed(() => {
    const last = Math.max(0, Math.ceil(this.rows().length / this.pageSize) - 1);
    const i = Math.min(this.pageIndex(), last);
    return this.rows().slice(i * this.pageSize, (i + 1) * this.pageSize);
  });

  /** Turn to the page that holds this shift and mark it, so the planner sees what was saved. */
  private showShift(id: number): void {
    const at = this.rows().findIndex((r) => r.id === id);
    if (at >= 0) this.pageIndex.set(Math.floor(at / this.pageSize));
    this.savedId.set(id);
  }

  protected turn(e: PageEvent): void {
    this.pageIndex.set(e.pageIndex);
  }

  constructor() {
    if (!this.fleet.sites().length) void this.fleet.load();
    void this.load();
    void this.loadPeople();
  }

  protected time(t: string): string {
    return formatTime(t);
  }

  /** People who may be on call (GET /api/people); until that list arrives, the rota's own names. */
  private people(): Person[] {
    const list = this.users();
    if (list) return list;
    const seen = new Map<number, string>();
    for (const s of this.shifts()) {
      seen.set(s.userId, s.userName ?? `user ${s.userId}`);
      if (s.backupUserId) seen.set(s.backupUserId, s.backupUserName ?? `user ${s.backupUserId}`);
    }
    const me = this.auth.user();
    if (me && ONCALL_ROLES.includes(me.role)) seen.set(me.id, me.name);
    return [...seen].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name));
  }

  protected async edit(shift: Shift | null): Promise<void> {
    const data: ShiftDialogData = { shift, sites: this.fleet.sites(), people: this.people() };
    const input = await firstValueFrom(this.dialog.open<ShiftDialog, ShiftDialogData, ShiftInput>(ShiftDialog, { data, width: '40em' }).afterClosed());
    if (!input) return;
    try {
      const saved = shift
        ? await firstValueFrom(this.http.patch<Shift>(`/api/oncall/${shift.id}`, input))
        : await firstValueFrom(this.http.post<Shift>('/api/oncall', input));
      this.snack.open('Shift saved', undefined, { duration: 2500 });
      await this.load();
      this.showShift(saved.id);
    } catch (err) {
      this.snack.open(errorText(err, 'Could not save the shift'), 'Close', { duration: 8000 });
    }
  }

  protected async remove(shift: Shift): Promise<void> {
    const ref = this.snack.open(`Delete the shift of ${shift.userName ?? 'user ' + shift.userId}?`, 'Delete', { duration: 8000 });
    const { dismissedByAction } = await firstValueFrom(ref.afterDismissed());
    if (!dismissedByAction) return;
    try {
      await firstValueFrom(this.http.delete(`/api/oncall/${shift.id}`));
      this.snack.open('Shift deleted', undefined, { duration: 2500 });
      await this.load();
    } catch (err) {
      this.snack.open(errorText(err, 'Could not delete the shift'), 'Close', { duration: 8000 });
    }
  }

  private async load(): Promise<void> {
    try {
      this.shifts.set(await firstValueFrom(this.http.get<Shift[]>('/api/oncall', { params: { from: String(Date.now() - 7 * 86_400_000) } })));
      this.error.set(null);
    } catch (err) {
      this.error.set(errorText(err, 'The rota could not be loaded'));
    }
  }

  private async loadPeople(): Promise<void> {
    try {
      if (!this.auth.hasRole('planner', 'admin')) return;
      const people = await firstValueFrom(this.http.get<Person[]>('/api/people', { params: { role: ONCALL_ROLES.join(',') } }));
      this.users.set(people.map((p) => ({ id: p.id, name: p.name, role: p.role })));
    } catch {
      /* falls back to the names in the rota */
    } finally {
      this.peopleSettled.set(true);
    }
  }
}
