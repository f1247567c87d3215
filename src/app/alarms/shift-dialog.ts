import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, Validators, AbstractControl, ValidationErrors } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { checkCoverage } from '../../../shared/oncall/coverage';
import { formatInZone, wallTimeToUtc, zoneAbbreviation } from '../ui/time-format';

export interface Shift {
  id: number;
  siteId: number;
  userId: number;
  userName: string | null;
  backupUserId: number | null;
  backupUserName: string | null;
  startsAt: string;
  endsAt: string;
  /** In the answer to a save: what the shift leaves at its site (server/services/alarms/oncall.ts). */
  coverage?: { overlaps: { shiftId: number | null; from: string; to: string }[]; uncovered: { from: string; to: string }[] };
}
export interface ShiftInput {
  siteId: number;
  userId: number;
  backupUserId: number | null;
  startsAt: string;
  endsAt: string;
}
/** Someone who can be on call (from GET /api/people); role when known, shown beside the name. */
export interface Person {
  id: number;
  name: string;
  role?: string;
}
export interface ShiftDialogData {
  shift: Shift | null;
  sites: { id: number; name: string; timeZone?: string | null }[];
  people: Person[];
  /** The rota as loaded (every site), to warn of overlaps and uncovered hours before saving. */
  shifts?: Shift[];
  /** The zone the site's times are entered and shown in. */
  zoneOf: (siteId: number | null) => string;
  /** Site picked for a new shift (the week shown). */
  siteId?: number | null;
  /** Start picked for a new shift, ms. */
  startsAt?: number;
}

/** "2030-03-04 07:00" (24 h, site zone) to ms; null unless whole and valid. */
export function parseSiteTime(text: string, zone: string): number | null {
  const m = /^\s*(\d{4})-(\d{2})-(\d{2})[ T](\d{2}):(\d{2})\s*$/.exec(text ?? '');
  if (!m) return null;
  const [y, mo, d, h, mi] = m.slice(1).map(Number);
  if (y < 2000 || y > 2100 || h > 23 || mi > 59) return null;
  const ms = wallTimeToUtc(y, mo, d, h, mi, 0, zone);
  // Feb 30 and the like come back as another day
  return formatInZone(ms, zone, 'date') === `${m[1]}-${m[2]}-${m[3]}` ? ms : null;
}

const siteTimeText = (ms: number, zone: string) => formatInZone(ms, zone, 'datetime', false);

function siteTimeValidator(zoneOf: () => string) {
  return (c: AbstractControl): ValidationErrors | null => (c.value && parseSiteTime(c.value, zoneOf()) === null ? { siteTime: true } : null);
}

/** Create or change one on-call shift: site, who, backup, from, until in the site's time zone (24 h), with overlap and gap warnings. */
@Component({
  selector: 'jw-shift-dialog',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, MatSelectModule],
  template: `
    <h2 mat-dialog-title>{{ data.shift ? 'Change shift' : 'New shift' }}</h2>
    <form [formGroup]="form" (ngSubmit)="submit()">
      <mat-dialog-content class="fields">
        <mat-form-field appearance="outline"
          ><mat-label>Site</mat-label>
          <mat-select formControlName="siteId" required>
            @for (s of data.sites; track s.id) {
              <mat-option [value]="s.id">{{ s.name }}</mat-option>
            }
          </mat-select>
          <mat-error>Choose a site.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"
          ><mat-label>On call</mat-label>
          <mat-select formControlName="userId" required>
            @for (p of data.people; track p.id) {
              <mat-option [value]="p.id"
                >{{ p.name }}
                @if (p.role) {
                  ({{ p.role }})
                }
              </mat-option>
            }
          </mat-select>
          <mat-error>Choose who is on call.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"
          ><mat-label>Backup</mat-label>
          <mat-select formControlName="backupUserId">
            <mat-option [value]="null">No backup</mat-option>
            @for (p of data.people; track p.id) {
              <mat-option [value]="p.id"
                >{{ p.name }}
                @if (p.role) {
                  ({{ p.role }})
                }
              </mat-option>
            }
          </mat-select>
        </mat-form-field>
        <p class="zone">Times in the site's zone, {{ zone() }} ({{ zoneAbbr() }}), 24-hour clock.</p>
        <mat-form-field appearance="outline"
          ><mat-label>From</mat-label>
          <input matInput formControlName="startsAt" required placeholder="2030-03-04 07:00" autocomplete="off" inputmode="numeric" />
          <mat-hint>YYYY-MM-DD HH:MM</mat-hint><mat-error>A whole date and 24-hour time, e.g. 2030-03-04 07:00.</mat-error>
        </mat-form-field>
        <mat-form-field appearance="outline"
          ><mat-label>Until</mat-label>
          <input matInput formControlName="endsAt" required placeholder="2030-03-04 19:00" autocomplete="off" inputmode="numeric" />
          <mat-hint>YYYY-MM-DD HH:MM</mat-hint><mat-error>A whole date and 24-hour time, e.g. 2030-03-04 19:00.</mat-error>
        </mat-form-field>
        @if (form.hasError('order') && form.touched) {
          <p class="error" role="alert">The shift must end after it starts.</p>
        }
        @if (form.value.backupUserId && form.value.backupUserId === form.value.userId) {
          <p class="error" role="alert">The backup must be someone else.</p>
        }
        @if (warnings().length) {
          <div class="warnings" role="status" aria-label="Warnings before saving">
            <p><mat-icon aria-hidden="true" fontIcon="warning" />Check before saving:</p>
            <ul>
              @for (w of warnings(); track w) {
                <li>{{ w }}</li>
              }
            </ul>
          </div>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit">{{ warnings().length ? 'Save anyway' : 'Save' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .fields {
      display: grid;
      grid-template-columns: 1fr 1fr;
      gap: 4px 12px;
    }
    .zone,
    .error,
    .warnings {
      grid-column: 1 / -1;
      margin: 0 0 8px;
    }
    .zone {
      color: var(--jw-muted-text);
    }
    .error {
      color: var(--jw-alarm-high);
    }
    .warnings {
      border: 1px solid var(--jw-warning);
      background: var(--jw-warning-bg);
      border-radius: 4px;
      padding: 8px 12px;
      font-variant-numeric: tabular-nums;
    }
    .warnings p {
      display: flex;
      align-items: center;
      gap: 6px;
      margin: 0;
      font-weight: 700;
      color: var(--jw-warning);
    }
    .warnings ul {
      margin: 4px 0 0;
      padding-left: 20px;
    }
    @media (max-width: 600px) {
      .fields {
        grid-template-columns: 1fr;
      }
    }
  `,
})
export class ShiftDialog {
  protected readonly data = inject<ShiftDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<ShiftDialog, ShiftInput>);
  private readonly initialSite = this.data.shift?.siteId ?? this.data.siteId ?? this.data.sites[0]?.id ?? null;
  private readonly start = this.data.shift ? Date.parse(this.data.shift.startsAt) : (this.data.startsAt ?? Math.ceil(Date.now() / 3_600_000) * 3_600_000);
  private readonly end = this.data.shift ? Date.parse(this.data.shift.endsAt) : this.start + 12 * 3_600_000;
  private readonly siteControl = new FormControl<number | null>(this.initialSite, Validators.required);
  private readonly siteZone = (): string => this.data.zoneOf(this.siteControl.value);

  readonly form = new FormGroup(
    {
      siteId: this.siteControl,
      userId: new FormControl<number | null>(this.data.shift?.userId ?? null, Validators.required),
      backupUserId: new FormControl<number | null>(this.data.shift?.backupUserId ?? null),
      startsAt: new FormControl(siteTimeText(this.start, this.data.zoneOf(this.initialSite)), {
        nonNullable: true,
        validators: [Validators.required, siteTimeValidator(() => this.siteZone())],
      }),
      endsAt: new FormControl(siteTimeText(this.end, this.data.zoneOf(this.initialSite)), {
        nonNullable: true,
        validators: [Validators.required, siteTimeValidator(() => this.siteZone())],
      }),
    },
    { validators: (g) => this.endsAfterStart(g) },
  );

  private readonly value = toSignal(this.form.valueChanges, { initialValue: this.form.value });
  protected readonly zone = computed(() => this.data.zoneOf(this.value().siteId ?? null));
  protected readonly zoneAbbr = computed(() => zoneAbbreviation(this.start, this.zone()));

  /** Overlaps with the site's other shifts, and hours nobody covers on the days this shift touches (site zone). */
  protected readonly warnings = computed(() => {
    const v = this.value();
    const zone = this.zone();
    const from = parseSiteTime(v.startsAt ?? '', zone);
    const to = parseSiteTime(v.endsAt ?? '', zone);
    if (from === null || to === null || to <= from || v.siteId == null) return [];
    const site = (this.data.shifts ?? [])
      .filter((s) => s.siteId === v.siteId)
      .map((s) => ({ id: s.id, userId: s.userId, startsAt: Date.parse(s.startsAt), endsAt: Date.parse(s.endsAt), name: s.userName ?? `user ${s.userId}` }));
    const dayStart = (ms: number) => parseSiteTime(`${formatInZone(ms, zone, 'date')} 00:00`, zone) ?? ms;
    const lastDay = dayStart(to - 1);
    const window = { from: dayStart(from), to: parseSiteTime(`${formatInZone(lastDay + 36 * 3_600_000, zone, 'date')} 00:00`, zone) ?? to };
    const check = checkCoverage({ id: this.data.shift?.id ?? null, userId: v.userId ?? -1, startsAt: from, endsAt: to }, site, window);
    const span = (a: number, b: number) => `${formatInZone(a, zone, 'datetime', false)} to ${formatInZone(b, zone, 'datetime')}`;
    return [
      ...check.overlaps.map(
        (o) =>
          `Overlaps ${site.find((s) => s.id === o.other.id)?.name ?? 'another'}'s shift${o.samePerson ? ' (the same person)' : ''}: ${span(o.from, o.to)}.`,
      ),
      ...check.uncovered.map((g) => `Nobody on call at this site from ${span(g.from, g.to)}.`),
    ];
  });

  private endsAfterStart(group: AbstractControl): ValidationErrors | null {
    const { startsAt, endsAt, siteId } = group.value as { startsAt: string; endsAt: string; siteId: number | null };
    const zone = this.data.zoneOf(siteId);
    const a = parseSiteTime(startsAt, zone);
    const b = parseSiteTime(endsAt, zone);
    return a !== null && b !== null && b <= a ? { order: true } : null;
  }

  submit(): void {
    this.form.markAllAsTouched();
    const v = this.form.getRawValue();
    if (this.form.invalid || (v.backupUserId !== null && v.backupUserId === v.userId)) return;
    const zone = this.data.zoneOf(v.siteId);
    this.ref.close({
      siteId: v.siteId!,
      userId: v.userId!,
      backupUserId: v.backupUserId,
      startsAt: new Date(parseSiteTime(v.startsAt, zone)!).toISOString(),
      endsAt: new Date(parseSiteTime(v.endsAt, zone)!).toISOString(),
    });
  }
}
