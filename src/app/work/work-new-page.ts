import { ChangeDetectionStrategy, Component, ElementRef, computed, effect, inject, input, signal, untracked, viewChild } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { provideNativeDateAdapter } from '@angular/material/core';
import { checkDueDate, MAX_DUE, MIN_DUE } from './due-date';
import { ActivatedRoute, Router, RouterLink } from '@angular/router';
import { finalize, map } from 'rxjs';
import { AuthService } from '../core/auth.service';
import { formValue } from '../ui/form-value';
import { WorkApi, errorText } from './work-api';
import { KIND_ALIASES, PRIORITY_TEXT } from './work-labels';
import { Assignee, WorkPriority, WorkTemplate } from './work-types';

/**
 * Create a work order. Linkable: /work/new?engineId=&alarmId=&kind= pre-fills it (the alarm screens link here);
 * planners plan it at once, other roles raise a request the planner accepts or declines.
 */
@Component({
  selector: 'jw-work-new-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [
    ReactiveFormsModule,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatDatepickerModule,
    RouterLink,
  ],
  providers: [provideNativeDateAdapter()],
  template: `
    <div class="page">
      <h1>{{ planner() ? 'New work order' : 'Request work' }}</h1>
      @if (alarmId()) {
        <p class="from-alarm">
          <mat-icon fontIcon="link" aria-hidden="true" />From alarm #{{ alarmId() }}: when you create the order, the alarm is linked and described in words at
          the top of its description (rule, priority, time, values); add your own notes below.
        </p>
      }
      @if (!planner()) {
        <p class="hint">Your request goes to the planner, who accepts or declines it.</p>
      }
      <form class="form" [formGroup]="form" (ngSubmit)="submit(dueText())">
        <mat-form-field appearance="outline">
          <mat-label>Engine</mat-label>
          <mat-select formControlName="engine" required>
            @for (e of engines(); track e.id) {
              <mat-option [value]="e.id">{{ siteName(e.siteId) }} · {{ e.name }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Kind of work</mat-label>
          <mat-select formControlName="kind" required>
            @for (t of templates(); track t.kind) {
              <mat-option [value]="t.kind">{{ t.title }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Title (optional)</mat-label>
          <input matInput formControlName="title" maxlength="200" />
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Description</mat-label>
          <textarea matInput formControlName="description" rows="3" maxlength="4000"></textarea>
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Priority</mat-label>
          <mat-select formControlName="priority">
            <mat-option [value]="null">{{ alarmId() ? 'As the alarm' : 'Medium' }}</mat-option>
            @for (p of priorities; track p) {
              <mat-option [value]="p">{{ priorityText[p] }}</mat-option>
            }
          </mat-select>
        </mat-form-field>
        @if (planner()) {
          <mat-form-field appearance="outline">
            <mat-label>Due date</mat-label>
            <input matInput formControlName="dueDate" [matDatepicker]="duePicker" [min]="minDue" [max]="maxDue" #dueInput />
            <mat-datepicker-toggle matIconSuffix [for]="duePicker" />
            <mat-datepicker #duePicker />
          </mat-form-field>
          <mat-form-field appearance="outline">
            <mat-label>Assign to</mat-label>
            <mat-select formControlName="assigneeId">
              <mat-option [value]="null">Not yet</mat-option>
              @for (a of assignees(); track a.id) {
                <mat-option [value]="a.id">{{ a.name }}</mat-option>
              }
            </mat-select>
          </mat-form-field>
        }
        @if (error(); as e) {
          <p class="error" role="alert"><mat-icon fontIcon="error" aria-hidden="true" />{{ e }}</p>
        }
        <div class="actions">
          <a mat-button routerLink="/work">Cancel</a>
          <button mat-flat-button type="submit" [disabled]="busy() || !ready()">{{ planner() ? 'Create work order' : 'Send request' }}</button>
        </div>
      </form>
    </div>
  `,
  styles: `
    .page {
      padding: 16px 24px;
      max-width: 640px;
    }
    h1 {
      font: var(--mat-sys-headline-small);
    }
    .form {
      display: flex;
      flex-direction: column;
      gap: 4px;
    }
    .actions {
      display: flex;
      justify-content: flex-end;
      gap: 8px;
    }
    .from-alarm,
    .hint {
      display: flex;
      gap: 6px;
      align-items: center;
      color: var(--jw-muted-text);
    }
    .error {
      color: var(--jw-alarm-high);
      display: flex;
      gap: 6px;
      align-items: center;
    }
  `,
})
export class WorkNewPage {
  private readonly api = inject(WorkApi);
  private readonly auth = inject(AuthService);
  private readonly router = inject(Router);
  /** The work kind asked for in the address (?kind=). */
  private readonly kindParam = toSignal(inject(ActivatedRoute).queryParamMap.pipe(map((q) => q.get('kind') ?? undefined)));

  /** Query parameters (component input binding). */
  readonly engineId = input<string | undefined>();
  readonly alarmId = input<string | undefined>();

  protected readonly planner = computed(() => this.auth.hasRole('planner', 'admin'));
  protected readonly templates = signal<WorkTemplate[]>([]);
  protected readonly engines = signal<{ id: number; name: string; siteId: number }[]>([]);
  protected readonly sites = signal<{ id: number; name: string }[]>([]);
  protected readonly assignees = signal<Assignee[]>([]);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly priorities: WorkPriority[] = ['low', 'medium', 'high', 'urgent'];
  protected readonly priorityText = PRIORITY_TEXT;

  private readonly fb = inject(NonNullableFormBuilder);
  /** The order asked for; the engine and the kind are required, the rest optional (the server checks it all again). */
  readonly form = this.fb.group({
    engine: this.fb.control<number | null>(null, Validators.required),
    kind: this.fb.control<string | null>(null, Validators.required),
    title: ['', Validators.maxLength(200)],
    description: ['', Validators.maxLength(4000)],
    priority: this.fb.control<WorkPriority | null>(null),
    dueDate: this.fb.control<Date | null>(null),
    assigneeId: this.fb.control<number | null>(null),
  });
  private readonly value = formValue(this.form);
  /** Engine and kind chosen (a typed due date is checked on submit, with its own message). */
  protected readonly ready = computed(() => {
    const v = this.value();
    return !!v.engine && !!v.kind;
  });
  protected readonly minDue = MIN_DUE;
  protected readonly maxDue = MAX_DUE;
  private readonly dueInput = viewChild<ElementRef<HTMLInputElement>>('dueInput');
  protected dueText(): string {
    return this.dueInput()?.nativeElement.value ?? '';
  }

  constructor() {
    effect(() => {
      const e = Number(this.engineId());
      const k = this.kindParam();
      untracked(() => {
        if (e > 0) this.form.controls.engine.setValue(e);
        if (k) this.form.controls.kind.setValue(KIND_ALIASES[k] ?? k);
      });
    });
    this.api.templates().subscribe({ next: (t) => this.templates.set(t), error: (e) => this.error.set(errorText(e)) });
    this.api.engines().subscribe({ next: (e) => this.engines.set(e), error: () => undefined });
    this.api.sites().subscribe({ next: (s) => this.sites.set(s), error: () => undefined });
    if (this.planner()) this.api.assignees().subscribe({ next: (a) => this.assignees.set(a), error: () => undefined });
  }

  protected siteName(id: number): string {
    return this.sites().find((s) => s.id === id)?.name ?? '';
  }

  protected submit(typedDue = ''): void {
    const v = this.form.getRawValue();
    if (!v.engine || !v.kind) return;
    const due = checkDueDate(v.dueDate, typedDue);
    if (!due.ok) return void this.error.set(`Due date: ${due.message}`);
    this.busy.set(true);
    this.error.set(null);
    const alarm = Number(this.alarmId());
    this.api
      .create({
        engineId: v.engine,
        kind: v.kind,
        ...(alarm > 0 ? { alarmId: alarm } : {}),
        ...(v.title.trim() ? { title: v.title.trim() } : {}),
        ...(v.description.trim() ? { description: v.description.trim() } : {}),
        ...(v.priority ? { priority: v.priority } : {}),
        ...(this.planner() && due.value ? { dueDate: due.value } : {}),
        ...(this.planner() && v.assigneeId ? { assigneeId: v.assigneeId } : {}),
      })
      .pipe(finalize(() => this.busy.set(false)))
      .subscribe({ next: (o) => void this.router.navigate(['/work', o.id]), error: (e: unknown) => this.error.set(errorText(e)) });
  }
}
