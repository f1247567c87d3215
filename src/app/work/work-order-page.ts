import { ChangeDetectionStrategy, Component, DestroyRef, computed, effect, inject, input, signal, untracked } from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { HttpErrorResponse } from '@angular/common/http';
import { FormControl, FormGroup, NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { Observable, Subscription, finalize, merge } from 'rxjs';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth.service';
import { PreferencesService } from '../core/preferences.service';
import { OpeningCheckPanel } from './opening-check-panel';
import { FilterDefault, filterDefault } from './parts-default';
import { AttachmentThumb } from './attachment-thumb';
import { WorkApi, errorText } from './work-api';
import { CONDITION_TEXT, EVENT_TEXT, PART_TEXT, PRIORITY_TEXT, STATUS_ICON, STATUS_TEXT, STEP_UNIT_TEXT, formatDate, formatDateTime } from './work-labels';
import { Assignee, GateRefusal, OpeningCheck, OpeningCondition, WorkOrderDetail, WorkPriority, WorkStatus, WorkStep } from './work-types';
import { formValue } from '../ui/form-value';
import { StepCoolantCheck } from './step-coolant-check';
import { StepTopUp } from './step-top-up';
import { isTopUpStep } from '../../../shared/work/top-up-step';
import { waitingFor, waitingText } from '../../../shared/work/step-order';
import { TransitionNoteData, TransitionNoteDialog } from './transition-note-dialog';
import { MatDialog } from '@angular/material/dialog';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { provideNativeDateAdapter } from '@angular/material/core';
import { checkDueDate, fromDateOnly, MAX_DUE, MIN_DUE } from './due-date';
import { toCelsius } from '../../../shared/units';
import { lockoutFor, lockStepBefore } from '../../../shared/work/lockout';
import { DisplayZone } from '../core/display-zone';
import { FleetService } from '../fleet/fleet.service';
import { NetworkStatus, isNoAnswer } from '../core/network-status';
import { OutboxPanel } from './offline/outbox-panel';
import { Outbox, type RecordInput } from './offline/outbox.service';
import type { OutboxEntry } from './offline/outbox-entry';

/** What is typed into one step not yet done: its value and remark, the lockout tick and a manual opening check. */
type StepDraftForm = FormGroup<{
  value: FormControl<number | null>;
  unit: FormControl<string>;
  note: FormControl<string>;
  lockout: FormControl<boolean>;
  manual: FormControl<boolean>;
  gaugeKpa: FormControl<number | null>;
  tempC: FormControl<number | null>;
  minutesSinceStop: FormControl<number | null>;
  checkedBy: FormControl<string>;
  reason: FormControl<string>;
}>;

type PartUnit = 'L' | 'gal' | 'pcs';

/** Units a technician may type a step's value in; the server converts to the step's own unit. */
const ENTRY_UNITS: Record<string, string[]> = { degC: ['degC', 'degF'], kPa: ['kPa', 'psi', 'bar'], L: ['L', 'gal'] };

/** One work order: plan, live opening check, checklist with gated steps, parts, files, history, sign-off and amendments. */
@Component({
  selector: 'jw-work-order-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatButtonModule,
    MatCardModule,
    MatCheckboxModule,
    MatExpansionModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    MatTableModule,
    MatDatepickerModule,
    OpeningCheckPanel,
    AttachmentThumb,
    StepCoolantCheck,
    StepTopUp,
    OutboxPanel,
  ],
  providers: [provideNativeDateAdapter()],
  templateUrl: './work-order-page.html',
  styleUrl: './work-order-page.scss',
})
export class WorkOrderPage {
  private readonly api = inject(WorkApi);
  protected readonly auth = inject(AuthService);
  private readonly prefs = inject(PreferencesService);
  private readonly dialog = inject(MatDialog);
  private readonly outbox = inject(Outbox);
  private readonly net = inject(NetworkStatus);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly order = signal<WorkOrderDetail | null>(null);
  protected readonly error = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly stepErrors = signal<Record<number, { text: string; conditions: OpeningCondition[] }>>({});
  protected readonly gate = signal<OpeningCheck | null>(null);
  protected readonly assignees = signal<Assignee[]>([]);
  private readonly fb = inject(NonNullableFormBuilder);
  private readonly destroyRef = inject(DestroyRef);
  /** One form per step, by step id; made when the step is first shown and kept while the page is open. */
  protected readonly drafts = this.fb.record<StepDraftForm>({});
  protected readonly amendment = this.fb.control('');
  protected readonly amendmentValue = formValue(this.amendment);
  /** Nothing chosen until the additive test says which filter (or the user chooses). */
  protected readonly part = this.fb.group({
    kind: [''],
    quantity: this.fb.control<number | null>(1),
    unit: this.fb.control<PartUnit>('pcs'),
    description: [''],
  });
  protected readonly partValue = formValue(this.part);
  /** The planner's fields; they show the order as the server has it, and a choice is sent at once. */
  protected readonly planForm = this.fb.group({
    assigneeId: this.fb.control<number | null>(null),
    priority: this.fb.control<WorkPriority>('medium'),
  });
  /** The filter the latest additive test asks for, on a filter change; null on other work. */
  protected readonly filterHint = signal<FilterDefault | null>(null);
  protected uploadStep: number | null = null;

  protected readonly statusText = STATUS_TEXT;
  protected readonly statusIcon = STATUS_ICON;
  protected readonly priorityText = PRIORITY_TEXT;
  protected readonly partText: Record<string, string | undefined> = PART_TEXT;
  protected readonly eventText: Record<string, string | undefined> = EVENT_TEXT;
  protected readonly unitText = STEP_UNIT_TEXT;
  protected readonly conditionText: Record<string, string | undefined> = CONDITION_TEXT;
  protected readonly partKinds = Object.keys(PART_TEXT);
  protected readonly fmtDate = formatDate;
  private readonly fleet = inject(FleetService);
  private readonly zones = inject(DisplayZone);
  /** Times in the engine's site zone (or the browser's by preference), as on the other pages. */
  protected readonly zone = computed(() => {
    const engineId = this.order()?.engineId;
    const siteId = this.fleet.engines().find((e) => e.id === engineId)?.siteId;
    return this.zones.zoneFor(siteId === undefined ? null : this.fleet.siteById().get(siteId)?.timeZone);
  });
  protected readonly fmtTime = (iso: string | number | null) => formatDateTime(iso, this.zone());

  protected readonly isPlanner = computed(() => this.auth.hasRole('planner', 'admin'));
  protected readonly isAssignee = computed(() => {
    const o = this.order();
    return !!o && this.auth.hasRole('technician') && o.assigneeId === this.auth.user()?.id;
  });
  /** A status move (start, send for sign-off) kept on this device, waiting to be sent. */
  protected readonly pendingMove = computed(() => {
    const id = this.order()?.id;
    const e = this.outbox.entries().find((x) => x.orderId === id && x.kind === 'status' && x.state === 'waiting');
    return e ? ((e.body?.['to'] as WorkStatus | undefined) ?? null) : null;
  });
  /** The assigned technician works on the order: in progress, or started on this device without a network. */
  protected readonly working = computed(
    () => this.isAssignee() && (this.order()?.status === 'in-progress' || (this.order()?.status === 'planned' && this.pendingMove() === 'in-progress')),
  );
  protected readonly editable = computed(() => ['requested', 'planned', 'in-progress'].includes(this.order()?.status ?? ''));
  protected readonly finished = computed(() => ['closed', 'cancelled'].includes(this.order()?.status ?? ''));
  protected readonly hasGated = computed(() => (this.order()?.steps ?? []).some((s) => s.gated && !s.doneAt));
  /** Required steps not done (one done on this device and waiting to be sent counts as done). */
  protected readonly openRequired = computed(() => (this.order()?.steps ?? []).filter((s) => !s.optional && !s.doneAt && !this.pendingDone()[s.id]).length);
  protected readonly anyLockout = signal(false);
  /** No network: changes are kept on the device (offline/outbox.service.ts) and sent when it returns. */
  protected readonly offline = computed(() => !this.net.online());
  /** Per step: its completion kept on this device, waiting to be sent (a refused one shows in the outbox panel). */
  protected readonly pendingDone = computed(() => {
    const id = this.order()?.id;
    const out: Record<number, OutboxEntry> = {};
    for (const e of this.outbox.entries()) if (e.orderId === id && e.kind === 'complete' && e.stepId !== null && e.state === 'waiting') out[e.stepId] = e;
    return out;
  });
  /** Per step: 'saving', 'saved' or an error text, shown under the inputs. */
  protected readonly draftState = signal<Record<number, string>>({});
  private readonly draftTimers = new Map<number, ReturnType<typeof setTimeout>>();
  /** Per gated step: the lock step whose confirmation holds for it (shared/work/lockout.ts), or null. */
  protected carriedLock(s: WorkStep): WorkStep | null {
    return lockoutFor(this.order()?.steps ?? [], s);
  }
  /** The lock step a gated step needs done first, if the template has one. */
  protected lockStep(s: WorkStep): WorkStep | null {
    return lockStepBefore(this.order()?.steps ?? [], s);
  }
  /** What a step waits for (the cap-off step before coolant goes in), in words, or null when it may be done now. */
  protected waitsFor(s: WorkStep): string | null {
    const first = waitingFor(this.order()?.steps ?? [], s.after);
    return first ? waitingText(first) : null;
  }
  /** Some gated step not yet done has its lockout carried (for the opening-check panel). */
  protected readonly lockoutCarried = computed(() =>
    (this.order()?.steps ?? []).some((s) => s.gated && !s.doneAt && lockoutFor(this.order()!.steps, s) !== null),
  );
  protected readonly sampleTaken = computed(() => !!this.order()?.steps.find((s) => s.key === 'take-sample')?.doneAt);

  /** Moves this user may offer now; the server decides again. */
  protected readonly moves = computed<{ to: WorkStatus; label: string; icon: string; needsNote?: boolean; primary?: boolean }[]>(() => {
    const o = this.order();
    if (!o) return [];
    const out: { to: WorkStatus; label: string; icon: string; needsNote?: boolean; primary?: boolean }[] = [];
    const planner = this.isPlanner();
    const tech = this.auth.hasRole('technician') && (!o.assigneeId || o.assigneeId === this.auth.user()?.id);
    if (o.status === 'requested' && planner)
      out.push({ to: 'planned', label: 'Accept', icon: 'check', primary: true }, { to: 'cancelled', label: 'Decline', icon: 'close', needsNote: true });
    if (this.pendingMove()) return out; // a move waits on this device: nothing else until it is sent
    if (o.status === 'planned' && tech) out.push({ to: 'in-progress', label: 'Start work', icon: 'play_arrow', primary: true });
    if (o.status === 'planned' && planner) out.push({ to: 'cancelled', label: 'Cancel', icon: 'block', needsNote: true });
    if (o.status === 'in-progress' && tech) out.push({ to: 'waiting-sign-off', label: 'Work done: send for sign-off', icon: 'send', primary: true });
    if (o.status === 'in-progress' && planner) out.push({ to: 'cancelled', label: 'Cancel', icon: 'block', needsNote: true });
    if (o.status === 'waiting-sign-off' && planner)
      out.push(
        { to: 'closed', label: 'Sign off and close', icon: 'verified', primary: true },
        { to: 'in-progress', label: 'Send back', icon: 'undo', needsNote: true },
      );
    return out;
  });

  constructor() {
    if (!this.fleet.engines().length) void this.fleet.load();
    // an answer for the order the address no longer names is dropped
    effect((onCleanup) => {
      const id = Number(this.id());
      const sub = untracked(() => this.load(id));
      onCleanup(() => sub.unsubscribe());
    });
    if (this.auth.hasRole('planner', 'admin')) this.api.assignees().subscribe({ next: (a) => this.assignees.set(a), error: () => undefined });
    const plan = this.planForm.controls;
    plan.assigneeId.valueChanges.pipe(takeUntilDestroyed()).subscribe((v) => this.plan('assigneeId', v));
    plan.priority.valueChanges.pipe(takeUntilDestroyed()).subscribe((v) => this.plan('priority', v));
    this.part.controls.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.partKindChanged());
    // what the outbox stored on the server shows as the server has it
    let round = this.outbox.sentRound();
    effect(() => {
      const r = this.outbox.sentRound();
      if (r === round) return;
      round = r;
      const o = untracked(this.order);
      if (o) untracked(() => this.reloadQuietly(o.id));
    });
  }

  private reloadQuietly(id: number): void {
    // still offline: the page keeps what it shows
    this.api.get(id).subscribe({ next: (o) => this.set(o), error: () => undefined });
  }

  private load(id: number): Subscription {
    return this.api.get(id).subscribe({
      next: (o) => {
        this.set(o);
        if (o.kind === 'filter-change' && !['closed', 'cancelled'].includes(o.status)) this.loadFilterDefault(o.engineId);
      },
      error: (e: unknown) => this.error.set(errorText(e)),
    });
  }

  private loadFilterDefault(engineId: number): void {
    this.api.coolantTests(engineId).subscribe({
      next: (tests) => {
        const d = filterDefault(tests);
        this.filterHint.set(d);
        // only when the user has not chosen yet (the unit follows the kind)
        if (d.kind && this.part.controls.kind.value === '') this.part.controls.kind.setValue(d.kind);
      },
      error: () => this.filterHint.set(null),
    });
  }

  private set(o: WorkOrderDetail): void {
    for (const s of o.steps) if (!this.drafts.contains(String(s.id))) this.addDraft(o.id, s);
    this.planForm.setValue({ assigneeId: o.assigneeId, priority: o.priority }, { emitEvent: false });
    this.order.set(o);
    this.anyLockout.set(this.lockoutCarried() || Object.values(this.drafts.controls).some((d) => d.controls.lockout.value));
    this.error.set(null);
  }

  /** The form of a step not seen before: the draft the server keeps (as typed, with its unit), then what this device still keeps. */
  private addDraft(orderId: number, s: WorkStep): void {
    const saved = !s.doneAt && s.resultValue !== null;
    const d = this.fb.group({
      value: this.fb.control<number | null>(saved ? s.resultValue : null),
      unit: [saved && s.resultUnit ? s.resultUnit : s.unit ? this.preferredUnit(s.unit) : ''],
      note: [!s.doneAt ? (s.resultText ?? '') : ''],
      lockout: [false],
      manual: [false],
      gaugeKpa: this.fb.control<number | null>(null),
      tempC: this.fb.control<number | null>(null),
      minutesSinceStop: this.fb.control<number | null>(null),
      checkedBy: [this.auth.user()?.name ?? ''],
      reason: [''],
    });
    this.overlayKept(orderId, s, d);
    this.drafts.addControl(String(s.id), d, { emitEvent: false });
    // what is typed into the value, unit or remark is saved as a draft (the step as the page has it now)
    const c = d.controls;
    merge(c.value.valueChanges, c.unit.valueChanges, c.note.valueChanges)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe(() => {
        const step = this.order()?.steps.find((x) => x.id === s.id);
        if (step) this.draftChanged(step);
      });
  }

  /** The form of a step (made in set() before the step is shown). */
  protected draft(s: WorkStep): StepDraftForm {
    return this.drafts.controls[String(s.id)];
  }

  /** What this device still keeps for a step (typed offline, not yet on the server) is what the step shows. */
  private overlayKept(orderId: number, s: WorkStep, d: StepDraftForm): void {
    for (const e of this.outbox.entries()) {
      if (e.orderId !== orderId || e.stepId !== s.id || e.state === 'sent' || !e.body || e.kind === 'photo') continue;
      const b = e.body as { value?: number | null; unit?: string; note?: string };
      if (b.value !== undefined) d.controls.value.setValue(b.value);
      if (b.unit) d.controls.unit.setValue(b.unit);
      if (b.note !== undefined) d.controls.note.setValue(b.note);
    }
  }

  /** Typed into a step: saved on the server after a short pause (not for a locked gated step, which takes nothing). */
  protected draftChanged(s: WorkStep): void {
    if (!this.working() || s.doneAt || (s.gated && !this.unlocked(s))) return;
    clearTimeout(this.draftTimers.get(s.id));
    this.draftTimers.set(
      s.id,
      setTimeout(() => void this.saveDraft(s), 600),
    );
  }

  private saveDraft(s: WorkStep): void {
    this.draftTimers.delete(s.id);
    const d = this.draft(s).getRawValue();
    const body: { value?: number | null; unit?: string; note?: string } = { note: d.note };
    if (s.input === 'value') {
      const v = d.value === null || d.value === undefined || (d.value as unknown) === '' ? null : Number(d.value);
      body.value = v !== null && Number.isFinite(v) ? v : null;
      body.unit = d.unit;
    }
    if (this.offline()) return void this.keepDraft(s, body);
    this.draftState.set({ ...this.draftState(), [s.id]: 'saving' });
    this.api.saveDraft(this.order()!.id, s.id, body).subscribe({
      next: (o) => {
        // keep what is being typed; take the rest of the order as the server has it
        this.order.set(o);
        this.draftState.set({ ...this.draftState(), [s.id]: 'saved' });
      },
      error: (e: unknown) => {
        if (isNoAnswer(e)) return void this.keepDraft(s, body);
        this.draftState.set({ ...this.draftState(), [s.id]: `Not saved: ${errorText(e)}` });
      },
    });
  }

  private async keepDraft(s: WorkStep, body: Record<string, unknown>): Promise<void> {
    const o = this.order()!;
    try {
      await this.outbox.record({ orderId: o.id, orderTitle: o.title, stepId: s.id, stepTitle: `${s.position}. ${s.title}`, kind: 'draft', body });
      this.draftState.set({ ...this.draftState(), [s.id]: 'kept' });
    } catch (e) {
      this.draftState.set({ ...this.draftState(), [s.id]: `Not saved: ${errorText(e)}` });
    }
  }

  /** The step of a top-up order that records the coolant added (volume and what it was). */
  protected isTopUp(o: WorkOrderDetail, s: WorkStep): boolean {
    return isTopUpStep(o.kind, s.key);
  }

  protected orderChanged(o: WorkOrderDetail): void {
    this.set(o);
  }

  private preferredUnit(stepUnit: string): string {
    const p = this.prefs.preferences();
    if (stepUnit === 'degC') return p.temperature === 'degF' ? 'degF' : 'degC';
    if (stepUnit === 'kPa') return p.pressure;
    if (stepUnit === 'L') return p.volume;
    return stepUnit;
  }

  /** A coolant-test reading from its step (key), in the step's unit: the recorded result, else what is being typed. */
  protected reading(o: WorkOrderDetail, key: string): number | null {
    const s = o.steps.find((x) => x.key === key);
    if (!s) return null;
    if (s.doneAt) return s.resultValue;
    const d = this.drafts.controls[String(s.id)]?.getRawValue();
    if (d?.value === null || d?.value === undefined || !Number.isFinite(d.value)) return null;
    if (!d.unit || d.unit === s.unit) return d.value;
    return s.unit === 'degC' && (d.unit === 'degF' || d.unit === 'K') ? toCelsius(d.value, d.unit as 'degF' | 'K') : null;
  }

  protected entryUnits(s: WorkStep): string[] {
    return ENTRY_UNITS[s.unit ?? ''] ?? [s.unit ?? ''];
  }

  protected unitLabel(u: string): string {
    return ({ degF: '°F', psi: 'psi', bar: 'bar', gal: 'US gal' } as Record<string, string>)[u] ?? this.unitText[u] ?? u;
  }

  protected lockText(s: WorkStep): string {
    const g = this.gate();
    if (this.offline())
      return this.unlocked(s)
        ? 'Unlocked on a manual check: the server judges it when the network returns'
        : 'Locked: no network for the live opening check (a manual check is possible)';
    if (!g) return 'Locked until the opening check has been read';
    const lock = this.lockStep(s);
    if (this.unlocked(s))
      return g.clear ? 'Unlocked: the opening check is clear and lockout/tagout is confirmed' : 'Unlocked on a manual check (live data stale)';
    if (g.clear)
      return lock ? `Opening check clear: do step ${lock.position} (lock out and tag out) to unlock` : 'Opening check clear: tick lockout/tagout to unlock';
    return g.stale ? 'Locked: live data missing or stale (a manual check is possible)' : 'Locked: opening check not clear';
  }

  protected unlocked(s: WorkStep): boolean {
    if (!s.gated) return true;
    const d = this.drafts.controls[String(s.id)]?.getRawValue();
    const g = this.gate();
    if (!d?.lockout && !this.carriedLock(s)) return false;
    // without a network the live check cannot be read: only a recorded manual check, judged by the server when sent
    if (this.offline()) return !!d?.manual;
    return !!g && (g.clear || (g.stale && !!d?.manual));
  }

  protected onGate(c: OpeningCheck): void {
    this.gate.set(c);
  }

  protected onLockout(): void {
    this.anyLockout.set(this.lockoutCarried() || Object.values(this.drafts.controls).some((d) => d.controls.lockout.value));
  }

  /** One change of the order: busy while it runs, the order as the server answers, else its words; `noAnswer` when the network is gone. */
  protected act(call: Observable<WorkOrderDetail>, then: { done?: () => void; noAnswer?: () => void } = {}): void {
    this.busy.set(true);
    this.error.set(null);
    call.pipe(finalize(() => this.busy.set(false))).subscribe({
      next: (o) => {
        this.set(o);
        then.done?.();
      },
      error: (e: unknown) => {
        this.error.set(errorText(e));
        if (isNoAnswer(e)) then.noAnswer?.();
      },
    });
  }

  protected move(to: WorkStatus, needsNote?: boolean): void {
    const o = this.order()!;
    if (!needsNote) {
      // the technician's own moves are kept on the device without a network (sent before anything recorded after them)
      const queueable = to === 'in-progress' || to === 'waiting-sign-off';
      if (queueable && this.offline()) return void this.keepMove(to);
      return this.act(this.api.transition(o.id, to), queueable ? { noAnswer: () => void this.keepMove(to) } : {});
    }
    // decline, cancel, send back: the note belongs to the action, and the action is confirmed first
    const data: TransitionNoteData =
      to === 'in-progress'
        ? {
            title: `Send work order #${o.id} back?`,
            message: 'It goes back to the technician as in progress.',
            confirm: 'Send back',
            noteLabel: 'What is still to do',
          }
        : o.status === 'requested'
          ? {
              title: `Decline request #${o.id}?`,
              message: 'The request is closed as cancelled; the person who raised it sees your note.',
              confirm: 'Decline the request',
              noteLabel: 'Why it is declined',
            }
          : {
              title: `Cancel work order #${o.id}?`,
              message: 'The work order is closed as cancelled and cannot be reopened; what was recorded stays in the history.',
              confirm: 'Cancel the work order',
              noteLabel: 'Why it is cancelled',
            };
    this.dialog
      .open<TransitionNoteDialog, TransitionNoteData, string>(TransitionNoteDialog, { data, width: '480px' })
      .afterClosed()
      .subscribe((note) => {
        if (note) this.act(this.api.transition(o.id, to, note));
      });
  }

  protected readonly minDue = MIN_DUE;
  protected readonly maxDue = MAX_DUE;
  protected readonly dueError = signal<string | null>(null);
  protected readonly dueValue = fromDateOnly;

  /** A due date is saved only when whole and valid (typed in full or picked); a half-typed one is never sent. */
  protected dueChanged(d: Date | null, el: HTMLElement): void {
    const r = checkDueDate(d, (el as HTMLInputElement).value ?? '');
    if (!r.ok) return void this.dueError.set(r.message);
    this.dueError.set(null);
    if (r.value !== this.order()?.dueDate) this.plan('dueDate', r.value ?? '');
  }

  protected plan(field: 'assigneeId' | 'dueDate' | 'priority', value: unknown): void {
    this.act(this.api.plan(this.order()!.id, { [field]: value === '' ? null : value }));
  }

  protected complete(s: WorkStep): void {
    const d = this.draft(s).getRawValue();
    clearTimeout(this.draftTimers.get(s.id));
    this.draftTimers.delete(s.id);
    const body: Parameters<WorkApi['completeStep']>[2] = {};
    if (s.input === 'value') {
      if (d.value === null || d.value === undefined) return this.stepError(s.id, 'Enter the value first.', []);
      body.value = Number(d.value);
      body.unit = d.unit;
    }
    if (d.note.trim()) body.note = d.note.trim();
    if (s.gated) {
      body.lockoutConfirmed = d.lockout || !!this.carriedLock(s);
      if (d.manual) {
        body.manualCheck = {
          gaugeKpa: Number(d.gaugeKpa),
          tempC: Number(d.tempC),
          minutesSinceStop: Number(d.minutesSinceStop),
          checkedBy: d.checkedBy.trim(),
          reason: d.reason.trim(),
        };
      }
    }
    if (this.offline()) return void this.keepDone(s, body);
    this.busy.set(true);
    this.api
      .completeStep(this.order()!.id, s.id, body)
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({
        next: (o) => {
          this.set(o);
          this.stepError(s.id, null, []);
        },
        error: (e: unknown) => {
          if (isNoAnswer(e)) return void this.keepDone(s, body);
          const refusal = e instanceof HttpErrorResponse && e.status === 409 ? (e.error as GateRefusal) : null;
          this.stepError(s.id, errorText(e), refusal?.conditions ?? []);
        },
      });
  }

  /** A step done without a network: kept on the device and sent when it returns. A gated step needs the recorded manual check. */
  private async keepDone(s: WorkStep, body: Parameters<WorkApi['completeStep']>[2]): Promise<void> {
    this.busy.set(false);
    if (s.gated && !body.manualCheck) {
      return this.stepError(
        s.id,
        'This step cannot be done offline: the opening check needs live data from the engine. Record a manual check (gauge, coolant temperature, time since stop) to go ahead; it is sent, judged and recorded by the server, and the planner is told, when the network returns.',
        [],
      );
    }
    const o = this.order()!;
    try {
      await this.outbox.record({
        orderId: o.id,
        orderTitle: o.title,
        stepId: s.id,
        stepTitle: `${s.position}. ${s.title}`,
        kind: 'complete',
        body: body as Record<string, unknown>,
      });
      this.stepError(s.id, null, []);
    } catch (e) {
      this.stepError(s.id, errorText(e), []);
    }
  }

  private stepError(id: number, text: string | null, conditions: OpeningCondition[]): void {
    const next = { ...this.stepErrors() };
    if (text) next[id] = { text, conditions };
    else delete next[id];
    this.stepErrors.set(next);
  }

  protected upload(ev: Event, stepId: number | null): void {
    const el = ev.target as HTMLInputElement;
    const file = el.files?.[0];
    el.value = '';
    if (!file) return;
    if (file.size > 8 * 1024 * 1024) {
      this.error.set('The file is larger than 8 MB.');
      return;
    }
    if (this.offline()) return void this.keepPhoto(file, stepId);
    const id = this.order()!.id;
    this.busy.set(true);
    this.error.set(null);
    this.api
      .upload(id, file, stepId)
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({
        next: () => this.reloadQuietly(id),
        error: (e: unknown) => {
          if (isNoAnswer(e)) void this.keepPhoto(file, stepId);
          else this.error.set(errorText(e));
        },
      });
  }

  private keepPhoto(file: File, stepId: number | null): Promise<boolean> {
    const step = this.order()!.steps.find((x) => x.id === stepId);
    const title = step ? `${step.position}. ${step.title}` : '';
    return this.keepOnDevice({ stepId, stepTitle: title, kind: 'photo', file, fileName: file.name }, 'The photo');
  }

  /** Keeps one change of this order on the device (offline/outbox.service.ts); says so in words when it cannot. */
  private async keepOnDevice(input: Omit<RecordInput, 'orderId' | 'orderTitle'>, what: string): Promise<boolean> {
    const o = this.order()!;
    try {
      await this.outbox.record({ orderId: o.id, orderTitle: o.title, ...input });
      this.error.set(null);
      return true;
    } catch (e) {
      this.error.set(`${what} could not be kept on this device: ${errorText(e)}`);
      return false;
    }
  }

  private keepMove(to: WorkStatus): Promise<boolean> {
    const title = to === 'in-progress' ? 'Start work' : 'Work done: send for sign-off';
    return this.keepOnDevice({ stepId: null, stepTitle: title, kind: 'status', body: { to } }, 'The status change');
  }

  /** A part or fluid used; without a network it is kept on the device and sent when the network returns. */
  protected addPart(): void {
    const p = this.part.getRawValue();
    if (!p.kind) return void this.error.set('Choose what was used first.');
    if (!p.quantity || p.quantity <= 0) return;
    const body = {
      kind: p.kind,
      quantity: Number(p.quantity),
      unit: p.unit,
      ...(p.description.trim() ? { description: p.description.trim() } : {}),
    };
    if (this.offline()) return void this.keepPart(body);
    this.busy.set(true);
    this.error.set(null);
    this.api
      .addPart(this.order()!.id, body)
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({
        next: (o) => {
          this.set(o);
          this.part.controls.description.setValue('');
        },
        error: (e: unknown) => {
          if (isNoAnswer(e)) void this.keepPart(body);
          else this.error.set(errorText(e));
        },
      });
  }

  private async keepPart(body: { kind: string; quantity: number; unit: PartUnit; description?: string }): Promise<void> {
    const title = `${body.quantity} ${body.unit} ${this.partText[body.kind] ?? body.kind}${body.description ? `: ${body.description}` : ''}`;
    if (await this.keepOnDevice({ stepId: null, stepTitle: title, kind: 'part', body }, 'The part')) this.part.controls.description.setValue('');
  }

  /** A fluid is counted in the user's volume unit, anything else in pieces. */
  private partKindChanged(): void {
    const kind = this.part.controls.kind.value;
    const fluid = kind === 'coolant' || kind === 'additive';
    this.part.controls.unit.setValue(fluid ? (this.prefs.preferences().volume === 'gal' ? 'gal' : 'L') : 'pcs');
  }

  protected addAmendment(): void {
    const text = this.amendment.value.trim();
    if (!text) return;
    this.act(this.api.addAmendment(this.order()!.id, text), { done: () => this.amendment.setValue('') });
  }

  protected stepAttachments(s: WorkStep) {
    return (this.order()?.attachments ?? []).filter((a) => a.stepId === s.id);
  }

  protected stepResult(s: WorkStep): string {
    if (s.resultValue === null) return '';
    return `${Number(s.resultValue.toFixed(3))} ${this.unitText[s.resultUnit ?? ''] ?? s.resultUnit ?? ''}`;
  }

  protected historyChange(h: { fromStatus: string | null; toStatus: string | null }): string {
    const t = (s: string | null) => (s ? ((STATUS_TEXT as Record<string, string>)[s] ?? s) : '');
    return h.toStatus ? (h.fromStatus ? `${t(h.fromStatus)} → ${t(h.toStatus)}` : t(h.toStatus)) : '';
  }

  protected conditionValue(c: OpeningCondition): string {
    if (c.value === null || typeof c.value === 'boolean') return '';
    return `${Number(c.value).toFixed(1)} ${c.unit} (limit ${c.limit} ${c.unit})`;
  }
}
