import { ChangeDetectionStrategy, Component, computed, effect, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, PageEvent } from '@angular/material/paginator';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { firstValueFrom } from 'rxjs';
import { AuthService } from '../core/auth.service';
import { DisplayZone } from '../core/display-zone';
import { FleetService } from '../fleet/fleet.service';
import { formatInZone, zoneAbbreviation } from '../ui/time-format';
import { AlarmsAdminService } from './alarms-admin.service';
import { errorText } from './alarms-api';
import { buildWeek, mondayOf, weekDays, type WeekShift } from './rota-week';
import { RotaWeekView } from './rota-week-view';
import { Person, Shift, ShiftDialog, ShiftDialogData, ShiftInput } from './shift-dialog';

/** Roles the server lets answer alarms (server/services/alarms/oncall.ts). */
const ONCALL_ROLES = ['technician', 'planner', 'admin'];

/** The on-call rota: who answers alarms for which site and when, with a backup. Planners and administrators change it. */
@Component({
  selector: 'jw-on-call-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [MatTableModule, MatButtonModule, MatIconModule, MatPaginatorModule, MatSelectModule, RotaWeekView],
  template: `
    <section class="page">
      <header class="head">
        <h1>On-call rota</h1>
        <button mat-flat-button type="button" (click)="edit(null)" [disabled]="!readyToEdit()"><mat-icon fontIcon="add" />New shift</button>
      </header>
      <p class="muted">Alarm e-mail goes to whoever is on call for the engine's site; unacknowledged alarms go on to the backup.</p>
      @if (error(); as e) {
        <p class="error" role="alert">{{ e }}</p>
      }
      <section class="week" aria-labelledby="week-title">
        <div class="week-head">
          <mat-form-field appearance="outline" subscriptSizing="dynamic" class="site-pick"
            ><mat-label>Site</mat-label>
            <mat-select [value]="siteId()" (valueChange)="siteId.set($event)" aria-label="Site of the week shown">
              @for (s of fleet.sites(); track s.id) {
                <mat-option [value]="s.id">{{ s.name }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
          <div class="nav">
            <button mat-stroked-button type="button" (click)="week.set(week() - 1)" aria-label="Previous week">
              <mat-icon fontIcon="chevron_left" />Previous
            </button>
            <button mat-stroked-button type="button" (click)="week.set(0)" [disabled]="week() === 0">This week</button>
            <button mat-stroked-button type="button" (click)="week.set(week() + 1)" aria-label="Next week">
              Next<mat-icon iconPositionEnd fontIcon="chevron_right" />
            </button>
          </div>
        </div>
        <h2 id="week-title">Week of {{ weekTitle() }}</h2>
        <p class="muted">Times in {{ zone() }} ({{ zoneAbbr() }}), 24-hour clock. Hatched and marked: hours with nobody on call. Pick a shift to change it.</p>
        @if (weekSummary(); as w) {
          <p class="summary" [class.warn]="w.gaps || w.overlaps">{{ w.text }}</p>
        }
        <jw-rota-week-view [days]="weekView()" (pick)="editById($event.id)" />
      </section>
      <h2>All shifts</h2>
      <p class="muted">From the past 7 days on, earliest first, in each site's time zone.</p>
      <table mat-table [dataSource]="pageRows()">
        <ng-container matColumnDef="now"
          ><th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Now</span></th>
          <td mat-cell *matCellDef="let s">
            @if (s.current) {
              <span class="current"><mat-icon aria-hidden="true" fontIcon="play_arrow" />On now</span>
            } @else if (s.past) {
              <span class="muted">Past</span>
            }
            @if (s.id === savedId()) {
              <span class="saved"><mat-icon aria-hidden="true" fontIcon="check" />Just saved</span>
            }
          </td></ng-container
        >
        <ng-container matColumnDef="site"
          ><th mat-header-cell *matHeaderCellDef>Site</th>
          <td mat-cell *matCellDef="let s">{{ s.siteName }}</td></ng-container
        >
        <ng-container matColumnDef="who"
          ><th mat-header-cell *matHeaderCellDef>On call</th>
          <td mat-cell *matCellDef="let s">{{ s.userName ?? 'user ' + s.userId }}</td></ng-container
        >
        <ng-container matColumnDef="backup"
          ><th mat-header-cell *matHeaderCellDef>Backup</th>
          <td mat-cell *matCellDef="let s">{{ s.backupUserName ?? (s.backupUserId ? 'user ' + s.backupUserId : 'none') }}</td></ng-container
        >
        <ng-container matColumnDef="from"
          ><th mat-header-cell *matHeaderCellDef>From</th>
          <td mat-cell *matCellDef="let s" class="jw-num">{{ time(s.startsAt, s.siteId) }}</td></ng-container
        >
        <ng-container matColumnDef="until"
          ><th mat-header-cell *matHeaderCellDef>Until</th>
          <td mat-cell *matCellDef="let s" class="jw-num">{{ time(s.endsAt, s.siteId) }}</td></ng-container
        >
        <ng-container matColumnDef="actions"
          ><th mat-header-cell *matHeaderCellDef><span class="jw-visually-hidden">Actions</span></th>
          <td mat-cell *matCellDef="let s" class="actions">
            <button
              mat-icon-button
              type="button"
              (click)="edit(s)"
              [attr.aria-label]="'Change shift of ' + s.userName + ', ' + s.siteName + ', from ' + time(s.startsAt, s.siteId)"
            >
              <mat-icon fontIcon="edit" />
            </button>
            <button
              mat-icon-button
              type="button"
              (click)="remove(s)"
              [attr.aria-label]="'Delete shift of ' + s.userName + ', ' + s.siteName + ', from ' + time(s.startsAt, s.siteId)"
            >
              <mat-icon fontIcon="delete" />
            </button></td
        ></ng-container>
        <tr mat-header-row *matHeaderRowDef="columns"></tr>
        <tr mat-row *matRowDef="let row; columns: columns" [class.past]="row.past" [attr.data-shift-id]="row.id"></tr>
      </table>
      @if (!rows().length) {
        <p class="muted">No shifts yet: alarm e-mail has nobody to go to.</p>
      } @else if (rows().length > pageSize) {
        <mat-paginator
          [length]="rows().length"
          [pageSize]="pageSize"
          [pageIndex]="pageIndex()"
          [hidePageSize]="true"
          (page)="turn($event)"
          aria-label="Pages of shifts"
        />
      }
    </section>
  `,
  styles: `
    .page {
      padding: 16px 24px 32px;
      max-width: 1200px;
    }
    h2 {
      font: var(--mat-sys-title-large);
      margin: 16px 0 4px;
    }
    .week {
      margin: 8px 0 24px;
    }
    .week-head {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      gap: 8px 16px;
    }
    .site-pick {
      min-width: 18em;
    }
    .nav {
      display: flex;
      flex-wrap: wrap;
      gap: 8px;
    }
    .summary {
      font-weight: 600;
    }
    .summary.warn {
      color: var(--jw-warning);
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
    .muted {
      color: var(--jw-muted-text);
    }
    table {
      width: 100%;
    }
    tr.past {
      color: var(--jw-muted-text);
    }
    .current,
    .saved {
      display: inline-flex;
      align-items: center;
      font-weight: 700;
    }
    .saved {
      font-weight: 400;
    }
    .actions {
      text-align: right;
      white-space: nowrap;
    }
    td.jw-num {
      white-space: nowrap;
    }
    .error {
      color: var(--jw-alarm-high);
    }
  `,
})
export class OnCallPage {
  private readonly api = inject(AlarmsAdminService);
  private readonly dialog = inject(MatDialog);
  private readonly snack = inject(MatSnackBar);
  private readonly auth = inject(AuthService);

  protected readonly fleet = inject(FleetService);
  private readonly zones = inject(DisplayZone);
  private readonly shifts = signal<Shift[]>([]);
  /** The week view: one site, this week moved by `week` weeks, in the site's zone. */
  protected readonly siteId = signal<number | null>(null);
  protected readonly week = signal(0);
  private readonly weekShifts = signal<Shift[]>([]);
  protected readonly zone = computed(() => this.zoneOf(this.siteId()));
  protected readonly zoneAbbr = computed(() => zoneAbbreviation(this.weekDays()[0]?.from ?? Date.now(), this.zone()));
  private readonly monday = computed(() => mondayOf(Date.now(), this.zone(), this.week()));
  private readonly weekDays = computed(() => weekDays(this.monday(), this.zone()));
  protected readonly weekTitle = computed(() => {
    const d = this.weekDays();
    return `${d[0].date} to ${d[6].date}`;
  });
  protected readonly weekView = computed(() => {
    const list: WeekShift[] = this.weekShifts().map((s) => ({
      id: s.id,
      userId: s.userId,
      userName: s.userName ?? `user ${s.userId}`,
      backupName: s.backupUserName,
      startsAt: Date.parse(s.startsAt),
      endsAt: Date.parse(s.endsAt),
    }));
    return buildWeek(list, this.monday(), this.zone());
  });
  protected readonly weekSummary = computed(() => {
    const days = this.weekView();
    const gaps = days.reduce((n, d) => n + d.uncovered.reduce((h, g) => h + (g.to - g.from), 0), 0) / 3_600_000;
    const overlaps = days.reduce((n, d) => n + d.overlaps.length, 0);
    const parts = [
      gaps ? `${Math.round(gaps * 10) / 10} h with nobody on call` : 'every hour covered',
      overlaps ? `${overlaps} overlap${overlaps > 1 ? 's' : ''}` : 'no overlaps',
    ];
    return { gaps, overlaps, text: `This week: ${parts.join(', ')}.` };
  });
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
    effect(() => {
      const sites = this.fleet.sites();
      if (this.siteId() === null && sites.length) this.siteId.set([...sites].sort((a, b) => a.name.localeCompare(b.name))[0].id);
    });
    effect(() => {
      const site = this.siteId();
      const days = this.weekDays();
      if (site !== null) void this.loadWeek(site, days[0].from, days[6].to);
    });
  }

  /** The zone a site's times are shown and entered in (the site's, or the browser's if the user prefers). */
  private zoneOf(siteId: number | null): string {
    return this.zones.zoneFor(siteId === null ? null : this.fleet.siteById().get(siteId)?.timeZone);
  }

  protected time(t: string, siteId: number): string {
    return formatInZone(t, this.zoneOf(siteId));
  }

  protected editById(id: number): void {
    const s = this.weekShifts().find((x) => x.id === id) ?? this.shifts().find((x) => x.id === id);
    if (s) void this.edit(s);
  }

  private async loadWeek(siteId: number, from: number, to: number): Promise<void> {
    try {
      const list = await firstValueFrom(this.api.shifts({ siteId, from, to }));
      if (this.siteId() === siteId && this.weekDays()[0].from === from) this.weekShifts.set(list);
    } catch (err) {
      this.error.set(errorText(err, 'The week could not be loaded'));
    }
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
    const data: ShiftDialogData = {
      shift,
      sites: this.fleet.sites(),
      people: this.people(),
      shifts: [...new Map([...this.shifts(), ...this.weekShifts()].map((s) => [s.id, s])).values()],
      zoneOf: (id) => this.zoneOf(id),
      siteId: this.siteId(),
    };
    const input = await firstValueFrom(this.dialog.open<ShiftDialog, ShiftDialogData, ShiftInput>(ShiftDialog, { data, width: '40em' }).afterClosed());
    if (!input) return;
    try {
      const saved = shift ? await firstValueFrom(this.api.updateShift(shift.id, input)) : await firstValueFrom(this.api.createShift(input));
      // the server's own check of what the saved shift leaves (the same shared function as the dialog's)
      const c = saved.coverage;
      const left = c
        ? [
            c.overlaps.length ? `${c.overlaps.length} overlap${c.overlaps.length > 1 ? 's' : ''}` : '',
            c.uncovered.length ? 'uncovered hours nearby' : '',
          ].filter(Boolean)
        : [];
      this.snack.open(left.length ? `Shift saved, with ${left.join(' and ')}: see the week` : 'Shift saved', undefined, {
        duration: left.length ? 5000 : 2500,
      });
      await this.load();
      this.showShift(saved.id);
      this.refreshWeek();
    } catch (err) {
      this.snack.open(errorText(err, 'Could not save the shift'), 'Close', { duration: 8000 });
    }
  }

  protected async remove(shift: Shift): Promise<void> {
    const ref = this.snack.open(`Delete the shift of ${shift.userName ?? 'user ' + shift.userId}?`, 'Delete', { duration: 8000 });
    const { dismissedByAction } = await firstValueFrom(ref.afterDismissed());
    if (!dismissedByAction) return;
    try {
      await firstValueFrom(this.api.deleteShift(shift.id));
      this.snack.open('Shift deleted', undefined, { duration: 2500 });
      await this.load();
      this.refreshWeek();
    } catch (err) {
      this.snack.open(errorText(err, 'Could not delete the shift'), 'Close', { duration: 8000 });
    }
  }

  private refreshWeek(): void {
    const site = this.siteId();
    const days = this.weekDays();
    if (site !== null) void this.loadWeek(site, days[0].from, days[6].to);
  }

  private async load(): Promise<void> {
    try {
      this.shifts.set(await firstValueFrom(this.api.shifts({ from: Date.now() - 7 * 86_400_000 })));
      this.error.set(null);
    } catch (err) {
      this.error.set(errorText(err, 'The rota could not be loaded'));
    }
  }

  private async loadPeople(): Promise<void> {
    try {
      if (!this.auth.hasRole('planner', 'admin')) return;
      const people = await firstValueFrom(this.api.people(ONCALL_ROLES));
      this.users.set(people.map((p) => ({ id: p.id, name: p.name, role: p.role })));
    } catch {
      /* falls back to the names in the rota */
    } finally {
      this.peopleSettled.set(true);
    }
  }
}
