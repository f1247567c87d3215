/**
 * Runs one engine's rules over its readings, in time order, with the shared pure evaluators
 * (shared/rules). No I/O: the live rule engine and the 7-day preview both drive it.
 */
import { standardAtmosphereKpa } from '../../../shared/atmosphere';
import { CHANNELS, RUNNING_RPM, type ChannelKey } from '../../../shared/channels';
import type { GlycolType } from '../../../shared/coolant/glycol';
import { initialBoilingMarginState, stepBoilingMargin, type BoilingMarginParams, type BoilingMarginState } from '../../../shared/rules/boiling-margin-rule';
import { initialConductivityState, stepConductivity, type ConductivityRuleParams, type ConductivityRuleState } from '../../../shared/rules/conductivity-rule';
import { initialDelayedState } from '../../../shared/rules/delayed-condition';
import { initialLimitState, stepLimit, type LimitRuleParams } from '../../../shared/rules/limit-rule';
import { initialNoDataState, lostNoData, stepNoData, type NoDataRuleParams, type NoDataRuleState } from '../../../shared/rules/no-data-rule';
import { initialRateState, stepRate, type RateRuleParams } from '../../../shared/rules/rate-rule';
import type { RuleEvent, RuleInput, StepResult } from '../../../shared/rules/rule-types';
import { initialStuckState, stepStuck, type StuckRuleParams } from '../../../shared/rules/stuck-rule';
import { initialHeaterLossState, stepHeaterLoss, type HeaterLossParams, type HeaterLossState } from '../../../shared/rules/heater-loss-rule';
import type { RuleDefinition } from './rule-definitions';

/** What an engine contributes to its rules' parameters. */
export interface EngineFacts {
  id: number;
  glycolType: GlycolType;
  /** % by volume, as stored on the engine. */
  glycolPercent: number;
  /** Conductivity baseline: from when (ms), and its value when already known. */
  baselineFrom: number;
  baselineValue: number | null;
  /** Duty, heater setpoint, cap rating and site elevation (absent in older callers: rules that need them stay quiet). */
  duty?: 'standby' | 'prime' | 'continuous';
  heaterSetpointC?: number | null;
  capPressureKpa?: number | null;
  elevationM?: number | null;
}

export interface EvalReading {
  channel: ChannelKey;
  ts: number;
  value: number;
  quality: 0 | 1;
}

export interface RuleHit {
  def: RuleDefinition;
  event: RuleEvent;
}

/** Readings further apart than this leave a gap that late readings may fill (see `unseen`). */
export const GAP_MS = 5000;
const MAX_GAPS = 64;

/** A speed reading older than this no longer tells whether the engine runs. */
export const RUN_STATE_FRESH_MS = 60_000;

interface Slot {
  def: RuleDefinition;
  params: Record<string, unknown>;
  state: unknown;
  /** Channels fed to this rule (null: every reading, as for no-data); computed once, not per reading. */
  channels: ChannelKey[] | null;
  /** armedAtTempC of the rule, or null. */
  armTemp: number | null;
}

/** The channels a rule kind is fed with (null: every reading counts, as for no-data). */
function channelsOf(def: RuleDefinition): ChannelKey[] | null {
  if (def.kind === 'no_data') return null;
  if (def.kind === 'boiling_margin') return ['coolant_temp', 'coolant_pressure'];
  // stuck: the watched channel, with speed and pressure as evidence that the engine's condition changed
  if (def.kind === 'stuck') return [def.channel, ...STUCK_CONTEXT.filter((c) => c !== def.channel)];
  return [def.channel];
}

const STUCK_CONTEXT: ChannelKey[] = ['engine_speed', 'coolant_pressure'];

const SYMBOL: Record<string, string> = { degC: '°C', kPa: 'kPa', 'uS/cm': 'µS/cm', rpm: 'rpm' };

/** Standard-atmosphere pressure at the site; sea level when the elevation is unknown (or out of the model's range). */
function siteAtmosphereKpa(elevationM: number | null | undefined): number {
  try {
    return standardAtmosphereKpa(elevationM ?? 0);
  } catch {
    return standardAtmosphereKpa(0);
  }
}

function paramsFor(def: RuleDefinition, engine: EngineFacts): Record<string, unknown> {
  // words for the evaluators' messages
  const info = CHANNELS[def.channel];
  const words = { label: info.label, unit: SYMBOL[info.unit] ?? info.unit };
  if (def.kind === 'limit' || def.kind === 'rate' || def.kind === 'stuck' || def.kind === 'no_data')
    return { ...words, ...def.params, ...(def.kind === 'no_data' ? { label: 'Engine data' } : {}) };
  if (def.kind === 'boiling_margin') {
    return {
      glycol: engine.glycolType,
      glycolPercent: engine.glycolPercent,
      basis: 'volume',
      atmosphereKpa: siteAtmosphereKpa(engine.elevationM),
      capPressureKpa: engine.capPressureKpa ?? null,
      ...def.params,
    };
  }
  if (def.kind === 'conductivity') return { baselineFrom: engine.baselineFrom, ...def.params };
  if (def.kind === 'heater_loss') return { heaterSetpointC: engine.heaterSetpointC ?? null, ...def.params };
  return def.params;
}

function initialState(def: RuleDefinition, engine: EngineFacts, startTs: number | null): unknown {
  switch (def.kind) {
    case 'limit':
      return initialLimitState();
    case 'rate':
      return initialRateState();
    case 'no_data':
      return initialNoDataState(startTs);
    case 'stuck':
      return initialStuckState();
    case 'boiling_margin':
      return initialBoilingMarginState();
    case 'heater_loss':
      return initialHeaterLossState();
    case 'conductivity': {
      const s = initialConductivityState();
      // a stored baseline is reused, so a restart does not learn a new one from contaminated coolant
      return engine.baselineValue === null ? s : { ...s, baselineFrom: engine.baselineFrom, baseline: engine.baselineValue };
    }
  }
}

/** The state of a rule whose alarm is still active (after a restart): it can then clear. */
function activeState(def: RuleDefinition, state: unknown, worst: number | null): unknown {
  if (def.kind === 'no_data') return { ...(state as NoDataRuleState), active: true };
  if (def.kind === 'stuck' || def.kind === 'heater_loss') return { ...(state as object), active: true };
  return { ...(state as object), ...initialDelayedState(), active: true, worstValue: worst, raisedValue: worst };
}

function step(slot: Slot, input: RuleInput & { channel?: ChannelKey }): StepResult<unknown> {
  const p = slot.params;
  switch (slot.def.kind) {
    case 'limit':
      return stepLimit(slot.state as ReturnType<typeof initialLimitState>, input, p as unknown as LimitRuleParams);
    case 'rate':
      return stepRate(slot.state as ReturnType<typeof initialRateState>, input, p as unknown as RateRuleParams);
    case 'no_data':
      return stepNoData(slot.state as NoDataRuleState, input, p as unknown as NoDataRuleParams);
    case 'stuck': {
      const ch = input.channel;
      const aux = ch === undefined || ch === slot.def.channel ? undefined : ch === 'engine_speed' ? 'speed' : 'pressure';
      return stepStuck(slot.state as ReturnType<typeof initialStuckState>, aux ? { ...input, aux } : input, p as unknown as StuckRuleParams);
    }
    case 'boiling_margin':
      return stepBoilingMargin(slot.state as BoilingMarginState, input as never, p as unknown as BoilingMarginParams);
    case 'conductivity':
      return stepConductivity(slot.state as ConductivityRuleState, input, p as unknown as ConductivityRuleParams);
    case 'heater_loss':
      return stepHeaterLoss(slot.state as HeaterLossState, input, p as unknown as HeaterLossParams);
  }
}

/**
 * A running-only rule with `armedAtTempC` is judged only once the coolant is that warm: a healthy system
 * sits near 0 kPa gauge and warms quickly right after a cold start (common practice), so pressure-low and
 * rising-fast rules would cry wolf at every start. Below it the rule sees the engine as "not running".
 */
function armTemp(def: RuleDefinition): number | null {
  const t = def.params.armedAtTempC;
  return typeof t === 'number' && Number.isFinite(t) ? t : null;
}

/** `onlyDuty` (e.g. 'standby'): the rule is for engines of that duty only. */
function appliesTo(def: RuleDefinition, engine: EngineFacts): boolean {
  const duty = def.params.onlyDuty;
  return typeof duty !== 'string' || engine.duty === duty;
}

const feedOrder = (a: EvalReading, b: EvalReading) => a.ts - b.ts || (a.channel === 'engine_speed' ? -1 : b.channel === 'engine_speed' ? 1 : 0);

/** True when already in feed order (the usual case): then no sorted copy is made. */
function inFeedOrder(readings: EvalReading[]): boolean {
  for (let i = 1; i < readings.length; i++) {
    const a = readings[i - 1];
    const b = readings[i];
    if (a.ts > b.ts || (a.ts === b.ts && b.channel === 'engine_speed' && a.channel !== 'engine_speed')) return false;
  }
  return true;
}

export class EngineEvaluator {
  private readonly slots: Slot[];
  private speed: { ts: number; running: boolean } | null = null;
  /** Latest good coolant temperature, for rules armed only when warm. */
  private coolantTemp: number | null = null;
  /** Newest reading time seen: older ones (a gateway's backlog) only count for no-data. */
  private newestTs = -Infinity;
  /** Oldest reading time evaluated, and the recent gaps between evaluated readings (for `unseen`). */
  private firstTs = Infinity;
  private readonly gaps: [number, number][] = [];

  constructor(
    readonly engine: EngineFacts,
    rules: RuleDefinition[],
    opts: { startTs?: number | null; activeRules?: Map<string, number | null> } = {},
  ) {
    this.slots = rules
      .filter((d) => d.enabled && appliesTo(d, engine))
      .map((def) => {
        let state = initialState(def, engine, opts.startTs ?? null);
        if (opts.activeRules?.has(def.key)) state = activeState(def, state, opts.activeRules.get(def.key) ?? null);
        return { def, params: paramsFor(def, engine), state, channels: channelsOf(def), armTemp: armTemp(def) };
      });
  }

  /** Running at `ts` from the latest fresh, good engine speed; undefined when not known. */
  running(ts: number): boolean | undefined {
    if (!this.speed || ts - this.speed.ts > RUN_STATE_FRESH_MS) return undefined;
    return this.speed.running;
  }

  /** Learned conductivity baseline (to persist), when the rule has one. */
  conductivityBaseline(): number | null {
    const slot = this.slots.find((s) => s.def.kind === 'conductivity');
    return slot ? ((slot.state as ConductivityRuleState).baseline ?? null) : null;
  }

  /** Worst value so far of every active alarm whose rule keeps one (limit, rate, boiling margin, conductivity). */
  activeWorst(): { key: string; worst: number }[] {
    const out: { key: string; worst: number }[] = [];
    for (const s of this.slots) {
      const st = s.state as { active?: boolean; worstValue?: number | null };
      if (st.active && typeof st.worstValue === 'number') out.push({ key: s.def.key, worst: st.worstValue });
    }
    return out;
  }

  /** Newest reading time evaluated (-Infinity before the first). */
  newest(): number {
    return this.newestTs;
  }

  /**
   * True when a reading at `ts`, older than the newest evaluated, was not evaluated before: it is older than the
   * first reading, or it falls inside a gap (over GAP_MS) between evaluated readings. A repeat of a reading already
   * evaluated (a QoS 1 redelivery) is not unseen. Only the last MAX_GAPS gaps are kept.
   */
  unseen(ts: number): boolean {
    if (ts < this.firstTs) return true;
    for (const [from, to] of this.gaps) if (ts > from && ts < to) return true;
    return false;
  }

  /** Late readings from `from` to `to` were evaluated elsewhere (for the record): a repeat of them is no longer unseen. */
  markSeen(from: number, to: number): void {
    if (from < this.firstTs) {
      if (this.firstTs !== Infinity && this.firstTs - to > GAP_MS) this.gaps.unshift([to, this.firstTs]);
      this.firstTs = from;
    }
    for (let i = this.gaps.length - 1; i >= 0; i--) {
      const [a, b] = this.gaps[i];
      if (to <= a || from >= b) continue;
      const parts: [number, number][] = [];
      if (from - a > GAP_MS) parts.push([a, from]);
      if (b - to > GAP_MS) parts.push([to, b]);
      this.gaps.splice(i, 1, ...parts);
    }
    while (this.gaps.length > MAX_GAPS) this.gaps.shift();
  }

  /** The rule's alarm is active (in the database): its state says so too, so the rule can clear it. */
  markActive(key: string, worst: number | null): void {
    for (const slot of this.slots) {
      if (slot.def.key !== key || (slot.state as { active?: boolean }).active) continue;
      slot.state = activeState(slot.def, slot.state, worst);
    }
  }

  /** Feed readings of this engine (any order): sorted by time, speed first at equal times. */
  feed(readings: EvalReading[]): RuleHit[] {
    const hits: RuleHit[] = [];
    const sorted = inFeedOrder(readings) ? readings : [...readings].sort(feedOrder);
    for (let i = 0; i < sorted.length; i++) {
      const r = sorted[i];
      const late = r.ts < this.newestTs;
      if (!late) {
        if (r.ts - this.newestTs > GAP_MS && Number.isFinite(this.newestTs)) {
          this.gaps.push([this.newestTs, r.ts]);
          if (this.gaps.length > MAX_GAPS) this.gaps.shift();
        }
        if (this.firstTs === Infinity) this.firstTs = r.ts;
        this.newestTs = r.ts;
      }
      if (r.channel === 'engine_speed' && r.quality === 0 && !late) this.speed = { ts: r.ts, running: r.value >= RUNNING_RPM };
      if (r.channel === 'coolant_temp' && r.quality === 0 && !late) this.coolantTemp = r.value;
      const running = this.running(r.ts);
      for (const slot of this.slots) {
        const chans = slot.channels;
        if (chans === null) {
          // no-data: a reading not after the last one heard changes nothing while the alarm is not
          // active (stepNoData returns an equal state and no event), so the other channels of the
          // same sample are skipped; it stays O(1) per reading either way
          const st = slot.state as NoDataRuleState;
          if (!st.active && st.lastTs !== null && r.ts <= st.lastTs) continue;
          this.apply(slot, { ts: r.ts, value: r.value, quality: r.quality }, hits);
        } else if (!late && (chans[0] === r.channel || (chans.length > 1 && chans.includes(r.channel)))) {
          const arm = slot.armTemp;
          const armed = arm === null || running !== true ? running : this.coolantTemp !== null && this.coolantTemp >= arm;
          this.apply(slot, { ts: r.ts, value: r.value, quality: r.quality, running: armed, channel: r.channel }, hits);
        }
      }
    }
    return hits;
  }

  /** The gateway declared this engine's data lost (death certificate): no-data rules raise now. */
  lost(at: number): RuleHit[] {
    const hits: RuleHit[] = [];
    for (const slot of this.slots) {
      if (slot.def.kind !== 'no_data') continue;
      const r = lostNoData(slot.state as NoDataRuleState, at, slot.params as unknown as NoDataRuleParams);
      slot.state = r.state;
      for (const event of r.events) hits.push({ def: slot.def, event });
    }
    return hits;
  }

  /** Let time pass without data: silences and delays complete. */
  tick(now: number): RuleHit[] {
    const hits: RuleHit[] = [];
    for (const slot of this.slots) this.apply(slot, { ts: now }, hits);
    return hits;
  }

  private apply(slot: Slot, input: RuleInput & { channel?: ChannelKey }, hits: RuleHit[]): void {
    const r = step(slot, input);
    slot.state = r.state;
    for (const event of r.events) hits.push({ def: slot.def, event });
  }
}
