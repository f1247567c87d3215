import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { MatSnackBar } from '@angular/material/snack-bar';
import { firstValueFrom } from 'rxjs';
import { CHANNELS } from '../../../shared/channels';
import { PreferencesService } from '../core/preferences.service';
import { FleetService } from '../fleet/fleet.service';
import { formatAlarmValue, formatTime, priorityLook } from './alarm-labels';
import { AlarmsAdminService, RuleDef, RulePreview } from './alarms-admin.service';
import { errorText } from './alarms-api';
import { ParamField, paramFields, paramUnit, ruleQuantity, toDisplay, toSi } from './rule-params';
import { byName } from '../ui/by-name';

interface Draft {
  enabled: boolean;
  values: Record<string, number | null>;
  dirty: boolean;
}
interface Preview extends RulePreview {
  engineName?: string;
}

const UNIT_OF_KIND: Record<string, string | null> = { rate: '/min', boiling_margin: 'K', no_data: null };

/**
 * The rule editor (administrators): the default profile, or one engine's overrides of it. Numbers are typed
 * in the user's units and sent in SI. Preview runs the edited rule over the engine's last 7 days first.
 */
@Component({
  selector: 'jw-rules-page',
  changeDetection: ChangeDetectionStrategy.OnPush,
  imports: [ReactiveFormsModule, MatExpansionModule, MatFormFieldModule, MatInputModule, MatSelectModule, MatSlideToggleModule, MatButtonModule, MatIconModule],
  templateUrl: './rules-page.html',
  styleUrl: './rules-page.scss',
})
export class RulesPage {
  private readonly api = inject(AlarmsAdminService);
  private readonly fleet = inject(FleetService);
  private readonly prefs = inject(PreferencesService);
  private readonly snack = inject(MatSnackBar);

  protected readonly engines = computed(() => [...this.fleet.engines()].sort((a, b) => byName(a.name, b.name)));
  /** null: the default profile. */
  protected readonly engineId = signal<number | null>(null);
  private readonly chosenPreviewEngine = signal<number | null>(null);
  /** The engine the default profile is previewed on: the one chosen, else the first engine. */
  protected readonly previewEngineId = computed(() => this.chosenPreviewEngine() ?? this.engines()[0]?.id ?? null);
  protected readonly rules = signal<RuleDef[]>([]);
  /** Whose rules `rules` holds (null: the default profile; undefined: none yet). Shown only when it is the choice. */
  protected readonly loadedFor = signal<number | null | undefined>(undefined);
  protected readonly drafts = signal<Record<string, Draft>>({});
  protected readonly previews = signal<Record<string, Preview | string>>({});
  protected readonly error = signal<string | null>(null);
  protected readonly saving = signal(false);
  protected readonly dirty = computed(() => Object.values(this.drafts()).some((d) => d.dirty));
  /** One number control per rule parameter (rule key, then parameter name), made with each load; a change goes to the drafts. */
  private readonly paramControls = signal<Record<string, Record<string, FormControl<number | null>>>>({});

  constructor() {
    if (!this.fleet.engines().length) void this.fleet.load();
    void this.load();
  }

  protected fields(r: RuleDef): ParamField[] {
    return paramFields(r.kind).filter((f) => typeof r.params[f.name] === 'number');
  }
  protected unit(r: RuleDef, f: ParamField): string {
    return paramUnit(f, ruleQuantity(r.kind, CHANNELS[r.channel].quantity), this.prefs.preferences());
  }
  protected priority(r: RuleDef): string {
    return priorityLook(r.priority).text;
  }
  protected channelLabel(r: RuleDef): string {
    return CHANNELS[r.channel]?.label ?? r.channel;
  }
  protected time(t: string | null): string {
    return formatTime(t);
  }
  protected previewOf(r: RuleDef): Preview | string | undefined {
    return this.previews()[r.key];
  }
  protected asPreview(p: Preview | string): Preview | null {
    return typeof p === 'string' ? null : p;
  }
  protected previewValue(r: RuleDef, v: number | null): string {
    const unit =
      r.kind in UNIT_OF_KIND ? (UNIT_OF_KIND[r.kind] === '/min' ? `${CHANNELS[r.channel].unit}/min` : UNIT_OF_KIND[r.kind]) : CHANNELS[r.channel].unit;
    return formatAlarmValue(v, unit, this.prefs.preferences());
  }

  /** The "Rules of" choice: 0 stands for the default profile (a select shows no text for a null value). */
  protected async chooseEngine(choice: number): Promise<void> {
    const id = choice || null;
    if (this.dirty() && !globalThis.confirm?.('Changes not saved will be lost. Go on?')) return;
    this.engineId.set(id);
    if (id !== null) this.chosenPreviewEngine.set(id);
    this.previews.set({});
    this.error.set(null);
    await this.load();
  }

  protected choosePreviewEngine(id: number): void {
    this.chosenPreviewEngine.set(id);
    this.previews.set({});
  }

  /** A preview shown for numbers that were since changed would mislead: drop it. */
  private forgetPreview(key: string): void {
    this.previews.update((all) => {
      const rest = { ...all };
      delete rest[key];
      return rest;
    });
  }

  protected control(key: string, name: string): FormControl<number | null> {
    return this.paramControls()[key][name];
  }

  protected setEnabled(key: string, enabled: boolean): void {
    this.forgetPreview(key);
    this.drafts.update((d) => ({ ...d, [key]: { ...d[key], enabled, dirty: true } }));
  }

  protected setValue(key: string, name: string, raw: string | number | null): void {
    const v = raw === '' || raw === null ? null : Number(raw);
    this.forgetPreview(key);
    this.drafts.update((d) => ({ ...d, [key]: { ...d[key], values: { ...d[key].values, [name]: Number.isFinite(v) ? v : null }, dirty: true } }));
  }

  /** A rule's edited parameters in SI; null when one is missing. */
  private siParams(r: RuleDef): Record<string, number> | null {
    const d = this.drafts()[r.key];
    const q = ruleQuantity(r.kind, CHANNELS[r.channel].quantity);
    const out: Record<string, number> = {};
    for (const f of this.fields(r)) {
      const v = d.values[f.name];
      if (v === null || v === undefined || !Number.isFinite(v)) return null;
      out[f.name] = toSi(v, f, q, this.prefs.preferences());
    }
    return out;
  }

  protected async preview(r: RuleDef): Promise<void> {
    const engineId = this.engineId() ?? this.previewEngineId();
    if (!engineId) {
      this.previews.update((p) => ({ ...p, [r.key]: 'Choose an engine to run the preview on.' }));
      return;
    }
    const params = this.siParams(r);
    if (!params) {
      this.previews.update((p) => ({ ...p, [r.key]: 'Fill in every number first.' }));
      return;
    }
    this.previews.update((p) => ({ ...p, [r.key]: 'Running over the last 7 days…' }));
    try {
      const res = await firstValueFrom(this.api.previewRule(engineId, r.key, params));
      const engineName = this.engines().find((e) => e.id === engineId)?.name;
      this.previews.update((p) => ({ ...p, [r.key]: { ...res, engineName } }));
    } catch (err) {
      this.previews.update((p) => ({ ...p, [r.key]: errorText(err, 'The preview failed') }));
    }
  }

  protected async save(): Promise<void> {
    const engineId = this.engineId();
    const rules = this.rules();
    for (const r of rules) {
      if (!this.siParams(r)) {
        this.snack.open(`${r.title}: fill in every number first.`, 'Close', { duration: 6000 });
        return;
      }
    }
    this.saving.set(true);
    try {
      if (engineId === null) {
        // the profile as sent: the definitions without the per-engine override fields
        const body = rules.map((rule) => {
          const def: Omit<RuleDef, 'overridden' | 'override'> & Partial<RuleDef> = { ...rule };
          delete def.overridden;
          delete def.override;
          return { ...def, enabled: this.drafts()[rule.key].enabled, params: { ...rule.params, ...this.siParams(rule) } };
        });
        await firstValueFrom(this.api.saveProfile(body));
      } else {
        // Keep earlier overrides; add one for every rule changed here.
        const overrides = rules
          .filter((r) => r.overridden || this.drafts()[r.key].dirty)
          .map((r) => ({
            rule: r.key,
            enabled: this.drafts()[r.key].enabled,
            params: this.drafts()[r.key].dirty ? this.siParams(r) : (r.override?.params ?? null),
          }));
        await firstValueFrom(this.api.saveOverrides(engineId, overrides));
      }
      this.snack.open('Rules saved', undefined, { duration: 2500 });
      await this.load();
    } catch (err) {
      this.snack.open(errorText(err, 'Could not save the rules'), 'Close', { duration: 8000 });
    } finally {
      this.saving.set(false);
    }
  }

  protected async resetEngine(): Promise<void> {
    const id = this.engineId();
    if (id === null) return;
    try {
      await firstValueFrom(this.api.saveOverrides(id, []));
      this.snack.open('This engine follows the default profile again', undefined, { duration: 3000 });
      await this.load();
    } catch (err) {
      this.snack.open(errorText(err, 'Could not reset'), 'Close', { duration: 8000 });
    }
  }

  protected async load(): Promise<void> {
    const id = this.engineId();
    try {
      const { rules } = await firstValueFrom(this.api.rules(id));
      // an answer for a choice no longer made (the profile's, after an engine was chosen) must not replace its rules
      if (this.engineId() !== id) return;
      const prefs = this.prefs.preferences();
      const drafts: Record<string, Draft> = {};
      for (const r of rules) {
        const q = ruleQuantity(r.kind, CHANNELS[r.channel].quantity);
        const values: Record<string, number | null> = {};
        for (const f of paramFields(r.kind)) if (typeof r.params[f.name] === 'number') values[f.name] = toDisplay(r.params[f.name] as number, f, q, prefs);
        drafts[r.key] = { enabled: r.enabled, values, dirty: false };
      }
      const controls: Record<string, Record<string, FormControl<number | null>>> = {};
      for (const [key, d] of Object.entries(drafts)) {
        controls[key] = {};
        for (const [name, v] of Object.entries(d.values)) {
          const c = new FormControl<number | null>(v, Validators.required);
          c.valueChanges.subscribe((typed) => this.setValue(key, name, typed));
          controls[key][name] = c;
        }
      }
      this.paramControls.set(controls);
      this.rules.set(rules);
      this.drafts.set(drafts);
      this.loadedFor.set(id);
      this.error.set(null);
    } catch (err) {
      if (this.engineId() !== id) return;
      this.error.set(errorText(err, 'The rules could not be loaded'));
    }
  }
}
