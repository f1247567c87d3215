import { JwTimePipe } from '../ui/time-format';
import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { catchError, of, switchMap } from 'rxjs';
import { BREAKDOWN_SIGN_TEXT, BREAKDOWN_SIGNS, type BreakdownSign, CoolantFamily } from '../../../shared/coolant';
import { fromCelsius, toCelsius, UNIT_SYMBOL } from '../../../shared/units';
import { AuthService } from '../core/auth.service';
import { PreferencesService } from '../core/preferences.service';
import { EngineService } from '../engine/engine.service';
import { FleetService } from '../fleet/fleet.service';
import { DisplayZone } from '../core/display-zone';
import { decimalText } from '../ui/form-value';
import { AdditiveDecisionView } from './additive-decision';
import { ChemistryFindings } from './chemistry-findings';
import { CoolantExplainer } from './coolant-explainer';
import { AdditiveForm, parseNumber } from './additive-form';
import { CoolantCautions } from './coolant-cautions';
import { CoolantHistoryChart, HistoryPoint } from './coolant-history-chart';
import { CoolantService } from './coolant.service';
import { TopUpsCard } from './top-ups-card';
import { AdditiveProfile, CoolantTest, ImportResult, NewCoolantTest, TestMethod } from './coolant-types';
import { JwQuantitiesPipe } from '../ui/quantity-text';

/** Glycol 40 to 60 % by volume: common practice for engine coolant (the coolant maker's figure first). */
const GLYCOL_BAND = { low: 40, high: 60, source: 'common practice' };
/** pH 8.0 to 11.0: common practice for conventional coolant, from memory (not a published figure); the maker's figure first. */
const PH_BAND = { low: 8, high: 11, source: 'common practice, from memory; the coolant maker’s figure first' };

const errorText = (e: unknown): string => {
  if (e instanceof HttpErrorResponse) return e.error?.error ?? `${e.status} ${e.statusText}`;
  return String(e);
};

/** One engine's coolant: test history with charts, a form to record a test (decision before and after saving), lab CSV import. */
@Component({
  selector: 'jw-engine-coolant-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    JwTimePipe,
    JwQuantitiesPipe,
    ReactiveFormsModule,
    RouterLink,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatTableModule,
    AdditiveForm,
    AdditiveDecisionView,
    ChemistryFindings,
    CoolantCautions,
    CoolantExplainer,
    CoolantHistoryChart,
    TopUpsCard,
    MatCheckboxModule,
  ],
  templateUrl: './engine-coolant-page.html',
  styleUrl: './engine-coolant-page.scss',
})
export class EngineCoolantPage {
  private readonly api = inject(CoolantService);
  private readonly engines = inject(EngineService);
  private readonly prefs = inject(PreferencesService);
  private readonly auth = inject(AuthService);
  private readonly fleet = inject(FleetService);
  private readonly zones = inject(DisplayZone);
  /** Route parameter (component input binding). */
  readonly id = input.required<string>();
  protected readonly engineId = computed(() => Number(this.id()));
  protected readonly canRecord = computed(() => this.auth.hasRole('technician', 'planner', 'admin'));
  protected readonly tUnit = computed(() => UNIT_SYMBOL[this.prefs.temperatureUnit()]);

  protected readonly reload = signal(0);
  protected readonly engine = toSignal(toObservable(this.engineId).pipe(switchMap((id) => this.engines.engine(id).pipe(catchError(() => of(null))))));
  protected readonly profile = toSignal(this.api.profile().pipe(catchError(() => of(null))), { initialValue: null as AdditiveProfile | null });
  protected readonly tests = toSignal(
    toObservable(computed(() => ({ id: this.engineId(), n: this.reload() }))).pipe(
      switchMap(({ id }) => this.api.tests(id).pipe(catchError(() => of([] as CoolantTest[])))),
    ),
    { initialValue: [] as CoolantTest[] },
  );
  /** Times in the engine's site zone (or the browser's by preference), as on the other pages. */
  protected readonly zone = computed(() => {
    const siteId = this.engine()?.siteId;
    return this.zones.zoneFor(siteId == null ? null : this.fleet.siteById().get(siteId)?.timeZone);
  });
  constructor() {
    if (!this.fleet.sites().length) void this.fleet.load();
  }

  protected readonly family = computed(() => (this.engine()?.coolantFamily === 'extended-life' ? 'extended-life' : 'conventional') as CoolantFamily);
  protected readonly columns = ['testedAt', 'method', 'sca', 'glycol', 'freeze', 'ph', 'ec', 'decision', 'by'];

  private series(pick: (t: CoolantTest) => number | null): HistoryPoint[] {
    return this.tests()
      .filter((t) => pick(t) !== null)
      .map((t) => ({ t: Date.parse(t.testedAt), v: pick(t)! }))
      .sort((a, b) => a.t - b.t);
  }
  protected readonly scaSeries = computed(() => this.series((t) => t.scaUnitsPerGal));
  protected readonly glycolSeries = computed(() => this.series((t) => t.glycolPercent));
  protected readonly freezeSeries = computed(() =>
    this.series((t) => (t.freezePointC === null ? null : fromCelsius(t.freezePointC, this.prefs.temperatureUnit()))),
  );
  protected readonly phSeries = computed(() => this.series((t) => t.ph));
  protected readonly ecSeries = computed(() => this.series((t) => t.conductivityUsCm));
  protected readonly scaBand = computed(() => {
    const l = this.profile()?.limits ?? { low: 1.2, high: 3.0 };
    return { ...l, source: 'common practice' };
  });
  protected readonly glycolBand = GLYCOL_BAND;
  protected readonly phBand = PH_BAND;
  protected readonly temp = (c: number | null) => (c === null ? '—' : `${fromCelsius(c, this.prefs.temperatureUnit()).toFixed(1)} ${this.tUnit()}`);

  // record form
  private readonly fb = inject(NonNullableFormBuilder);
  /** A test as typed: readings as text in the user's units (the freeze point too), named as the API names them. */
  readonly form = this.fb.group({
    method: ['strip' as TestMethod],
    readings: this.fb.group({
      scaUnitsPerGal: ['', decimalText],
      glycolPercent: ['', decimalText],
      freezePointC: ['', decimalText],
      ph: ['', decimalText],
      conductivityUsCm: ['', decimalText],
      nitritePpm: ['', decimalText],
      molybdatePpm: ['', decimalText],
      reserveAlkalinityMl: ['', decimalText],
    }),
    appearance: ['', Validators.maxLength(200)],
    notes: [''],
  });
  private readonly scaText = toSignal(this.form.controls.readings.controls.scaUnitsPerGal.valueChanges, { initialValue: '' });
  /** Glycol-breakdown signs ticked, and "looked, none seen" (neither: not looked at). */
  protected readonly signText = BREAKDOWN_SIGN_TEXT;
  protected readonly signKeys = BREAKDOWN_SIGNS;
  readonly signs = signal<ReadonlySet<BreakdownSign>>(new Set());
  readonly noSigns = signal(false);
  protected toggleSign(s: BreakdownSign, on: boolean): void {
    const next = new Set(this.signs());
    if (on) next.add(s);
    else next.delete(s);
    this.signs.set(next);
    if (on) this.noSigns.set(false);
  }
  protected setNoSigns(on: boolean): void {
    this.noSigns.set(on);
    if (on) this.signs.set(new Set());
  }
  protected readonly scaValue = computed(() => {
    const v = parseNumber(this.scaText());
    return v === null || Number.isNaN(v) ? null : v;
  });
  protected readonly saving = signal(false);
  protected readonly saveError = signal<string | null>(null);
  protected readonly saved = signal<CoolantTest | null>(null);

  protected save(): void {
    const value = this.form.getRawValue();
    const parsed: Record<string, number | null> = {};
    for (const [k, text] of Object.entries(value.readings)) {
      const v = parseNumber(text);
      if (this.form.controls.readings.get(k)?.invalid || (v !== null && Number.isNaN(v))) {
        this.saveError.set(`${k}: type a number (use a point for decimals)`);
        return;
      }
      parsed[k] = v;
    }
    const breakdownSigns: BreakdownSign[] | null = this.signs().size ? [...this.signs()] : this.noSigns() ? [] : null;
    if (Object.values(parsed).every((v) => v === null) && breakdownSigns === null) {
      this.saveError.set('Enter at least one measured value.');
      return;
    }
    const body: NewCoolantTest = {
      method: value.method,
      scaUnitsPerGal: parsed['scaUnitsPerGal'],
      glycolPercent: parsed['glycolPercent'],
      freezePointC: parsed['freezePointC'] === null ? null : toCelsius(parsed['freezePointC'], this.prefs.temperatureUnit()),
      ph: parsed['ph'],
      conductivityUsCm: parsed['conductivityUsCm'],
      nitritePpm: parsed['nitritePpm'],
      molybdatePpm: parsed['molybdatePpm'],
      reserveAlkalinityMl: parsed['reserveAlkalinityMl'],
      breakdownSigns,
      appearance: value.appearance.trim() || null,
      notes: value.notes.trim() || null,
    };
    this.saving.set(true);
    this.saveError.set(null);
    this.api.record(this.engineId(), body).subscribe({
      next: (t) => {
        this.saving.set(false);
        this.saved.set(t);
        this.form.reset({ method: value.method });
        this.signs.set(new Set());
        this.noSigns.set(false);
        this.reload.update((n) => n + 1);
      },
      error: (e) => {
        this.saving.set(false);
        this.saveError.set(errorText(e));
      },
    });
  }

  // lab import
  protected readonly file = signal<File | null>(null);
  protected readonly importResult = signal<ImportResult | null>(null);
  protected readonly importError = signal<string | null>(null);
  protected readonly importing = signal(false);

  protected pick(ev: Event): void {
    const f = (ev.target as HTMLInputElement).files?.[0] ?? null;
    this.file.set(f);
    this.importResult.set(null);
    this.importError.set(null);
  }

  protected upload(preview: boolean): void {
    const f = this.file();
    if (!f) return;
    this.importing.set(true);
    this.importError.set(null);
    this.api.importLab(f, { preview, engineId: this.engineId() }).subscribe({
      next: (r) => {
        this.importing.set(false);
        this.importResult.set(r);
        if (!preview) this.reload.update((n) => n + 1);
      },
      error: (e) => {
        this.importing.set(false);
        this.importError.set(errorText(e));
      },
    });
  }

  /** Findings out of range, in words (the history shows them beside the additive decision). */
  protected findingsText(t: CoolantTest): string {
    const bad = (t.decision?.findings ?? []).filter((f) => f.status === 'low' || f.status === 'high' || f.status === 'short' || f.status === 'signs');
    const name = {
      nitritePpm: 'nitrite',
      molybdatePpm: 'molybdate',
      ph: 'pH',
      reserveAlkalinityMl: 'reserve alkalinity',
      freezeProtection: 'freeze protection',
      breakdownSigns: 'glycol breakdown',
    } as const;
    return bad.map((f) => `${name[f.field]} ${f.status === 'signs' ? 'signs seen' : f.status}`).join(', ');
  }

  protected statusText(t: CoolantTest): string {
    const s = t.decision?.additive?.status;
    const extra = this.findingsText(t);
    if (!s) return extra || (t.decision?.notes[0] ?? '—');
    const f = t.decision!.additive!.filter;
    const text = { low: 'Low', 'in-range': 'In range', high: 'High', 'not-applicable': 'No strip decision' }[s];
    const base = f ? `${text} · ${f} filter` : text;
    return extra ? `${base} · ${extra}` : base;
  }
}
