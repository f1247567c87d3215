/**
 * The live rule engine: every batch of accepted readings (telemetry.onReadings) goes through the
 * engine's evaluator at once, in memory; a 1 s tick lets silences and delays complete without data.
 * Raise and clear events go to the alarm service. Engines out of service or retired are not evaluated.
 */
import type { Logger } from '../../logger';
import type { Models } from '../../models';
import type { AcceptedReading } from '../../telemetry/types';
import type { AlarmService } from './alarm-service';
import type { EngineDirectory, EngineEntry } from './engine-directory';
import { EngineEvaluator, type EngineFacts, type RuleHit } from './engine-evaluator';
import { LateEvaluation, type LateFinding } from './late-evaluation';
import { DEFAULT_PROFILE_NAME, DEFAULT_RULES, effectiveRules, replayMsFor, type RuleDefinition, type RuleOverride } from './rule-definitions';

/** How often engines (out of service, glycol mix) are re-read from the database. */
export const DIRECTORY_REFRESH_MS = 10_000;

export interface RuleEngineDeps {
  models: Models;
  log: Logger;
  directory: EngineDirectory;
  alarms: AlarmService;
  /** Last time anything was heard from an engine (so no-data counts across a restart). */
  lastSeen(engineId: number): number | null;
  /** Readings older than this when they arrive are late data (ALARM_LATE_AFTER_S). */
  lateAfterMs: number;
  /** Several servers: whether this server holds the engine's lease (absent: every engine is ours). */
  owns?(engineId: number): boolean;
  /** Stored readings of these engines since `sinceTs`, in time order (to rebuild rule state on taking an engine over). */
  storedReadings?(engineIds: number[], sinceTs: number): Promise<AcceptedReading[]>;
}

/** Stored readings held in memory at once while engines are taken over (a few engines per query). */
const REPLAY_READINGS_BUDGET = 250_000;
/** Channels per engine, for that budget (1 Hz assumed: the usual fastest rate). */
const CHANNELS_PER_ENGINE = 5;

/** The default profile row, written with the built-in rules when there is none. */
export async function ensureDefaultProfile(models: Models): Promise<RuleDefinition[]> {
  const [row] = await models.RuleProfile.findOrCreate({
    where: { isDefault: true },
    defaults: { name: DEFAULT_PROFILE_NAME, isDefault: true, rules: DEFAULT_RULES },
  });
  const rules = typeof row.rules === 'string' ? (JSON.parse(row.rules) as RuleDefinition[]) : row.rules;
  // rules added in later versions join a stored profile (its own rules and tuning stay as they are)
  const missing = DEFAULT_RULES.filter((d) => !rules.some((r) => r.key === d.key));
  if (!missing.length) return rules;
  const merged = [...rules, ...missing];
  await row.update({ rules: merged });
  return merged;
}

/** What the evaluators depend on: a change rebuilds the engine's evaluator. */
const factsKey = (e: EngineEntry) => [e.glycolType, e.glycolPercent, e.duty, e.heaterSetpointC, e.capPressureKpa, e.elevationM].join('/');

export class RuleEngine {
  private profile: RuleDefinition[] = DEFAULT_RULES;
  private overrides = new Map<number, RuleOverride[]>();
  private baselines = new Map<number, { from: number; value: number | null }>();
  private readonly evaluators = new Map<number, EngineEvaluator>();
  private readonly facts = new Map<number, string>();
  private outOfService = new Set<number>();
  /** Per engine: newest reading time and when its batch arrived (wall clock), for the clock of late data. */
  private readonly arrivals = new Map<number, { newestTs: number; arrivedAt: number }>();
  private lastRefresh = 0;
  private refreshing: Promise<void> | null = null;
  /** Late readings older than the newest evaluated: evaluated for the record (late-evaluation.ts). */
  private readonly late: LateEvaluation;
  /** Engines being taken over: live readings wait here until the replay of their stored history is done. */
  private readonly adopting = new Map<number, AcceptedReading[]>();

  constructor(private readonly deps: RuleEngineDeps) {
    this.late = new LateEvaluation(deps.lateAfterMs);
  }

  /** The rule definitions in force for an engine (profile + overrides). */
  rulesFor(engineId: number): RuleDefinition[] {
    return effectiveRules(this.profile, this.overrides.get(engineId) ?? []);
  }

  ruleDef(engineId: number, key: string): RuleDefinition | undefined {
    return this.rulesFor(engineId).find((r) => r.key === key) ?? this.profile.find((r) => r.key === key) ?? DEFAULT_RULES.find((r) => r.key === key);
  }

  profileRules(): RuleDefinition[] {
    return this.profile;
  }

  /** Read profile, overrides, baselines and engines; rebuild every evaluator. */
  async load(): Promise<void> {
    const { models } = this.deps;
    this.profile = await ensureDefaultProfile(models);
    const rows = await models.EngineRule.findAll();
    this.overrides = new Map();
    for (const r of rows) {
      const list = this.overrides.get(r.engineId) ?? [];
      list.push({ rule: r.rule, enabled: r.enabled, params: typeof r.params === 'string' ? JSON.parse(r.params) : r.params });
      this.overrides.set(r.engineId, list);
    }
    const bl = await models.EngineBaseline.findAll({
      where: { channel: 'coolant_conductivity' },
      order: [
        ['baselineFrom', 'ASC'],
        ['id', 'ASC'],
      ],
    });
    this.baselines = new Map();
    for (const b of bl) this.baselines.set(b.engineId, { from: new Date(b.baselineFrom).getTime(), value: b.value });
    this.evaluators.clear();
    this.facts.clear();
    await this.refreshEngines(true);
  }

  private factsOf(e: EngineEntry): EngineFacts {
    const b = this.baselines.get(e.id);
    return {
      id: e.id,
      glycolType: e.glycolType,
      glycolPercent: e.glycolPercent,
      baselineFrom: b?.from ?? e.createdAt,
      baselineValue: b?.value ?? null,
      duty: e.duty,
      heaterSetpointC: e.heaterSetpointC,
      capPressureKpa: e.capPressureKpa,
      elevationM: e.elevationM,
    };
  }

  private owns(engineId: number): boolean {
    return this.deps.owns ? this.deps.owns(engineId) : true;
  }

  private build(e: EngineEntry): void {
    const open = this.deps.alarms.openAlarms();
    const active = new Map<string, number | null>();
    for (const key of open.keys()) {
      const [id, rule] = key.split('/');
      if (Number(id) === e.id) active.set(rule, null);
    }
    const facts = this.factsOf(e);
    this.evaluators.set(e.id, new EngineEvaluator(facts, this.rulesFor(e.id), { startTs: this.deps.lastSeen(e.id), activeRules: active }));
    this.facts.set(e.id, factsKey(e));
  }

  /** Re-read engines: start evaluating new ones, stop and suppress those out of service, rebuild on a new glycol mix. */
  async refreshEngines(force = false): Promise<void> {
    if (this.refreshing) return this.refreshing;
    this.refreshing = (async () => {
      const engines = await this.deps.directory.refresh();
      this.lastRefresh = Date.now();
      const nextOos = new Set<number>();
      for (const e of engines.values()) {
        // another server evaluates it (several servers), or it is being taken over right now
        if (!this.owns(e.id) || this.adopting.has(e.id)) {
          if (!this.adopting.has(e.id)) this.evaluators.delete(e.id);
          continue;
        }
        const off = e.outOfService || e.retired;
        if (off) {
          nextOos.add(e.id);
          this.evaluators.delete(e.id);
          this.late.drop(e.id);
          if (!this.outOfService.has(e.id)) await this.deps.alarms.setOutOfService(e.id, true);
          continue;
        }
        if (this.outOfService.has(e.id)) await this.deps.alarms.setOutOfService(e.id, false);
        if (force || !this.evaluators.has(e.id) || this.facts.get(e.id) !== factsKey(e)) this.build(e);
      }
      for (const id of [...this.evaluators.keys()]) if (!engines.has(id)) this.evaluators.delete(id);
      this.outOfService = nextOos;
    })().finally(() => {
      this.refreshing = null;
    });
    return this.refreshing;
  }

  /** Rules of one engine changed (override saved): rebuild its evaluator. */
  async reloadRules(): Promise<void> {
    await this.load();
  }

  /** telemetry.onReadings listener: synchronous, no I/O on this path (alarm writes are queued). */
  handleReadings(readings: AcceptedReading[]): void {
    if (!readings.length) return;
    // one MQTT message is one engine's: no regrouping then (no Map and list per batch)
    const first = readings[0].engineId;
    let oneEngine = true;
    for (let i = 1; i < readings.length && oneEngine; i++) oneEngine = readings[i].engineId === first;
    if (oneEngine) return this.handleEngine(first, readings);
    const byEngine = new Map<number, AcceptedReading[]>();
    for (const r of readings) {
      const list = byEngine.get(r.engineId);
      if (list) list.push(r);
      else byEngine.set(r.engineId, [r]);
    }
    for (const [engineId, list] of byEngine) this.handleEngine(engineId, list);
  }

  private handleEngine(engineId: number, list: AcceptedReading[]): void {
    const held = this.adopting.get(engineId);
    if (held) {
      for (const r of list) held.push(r);
      return;
    }
    if (!this.owns(engineId)) return; // another server's engine
    const ev = this.evaluators.get(engineId);
    if (!ev) {
      // an engine added since the last refresh: pick it up soon (readings until then are not evaluated)
      if (!this.outOfService.has(engineId) && Date.now() - this.lastRefresh > 1000)
        void this.refreshEngines().catch((err) => this.deps.log.error('alarms: engine refresh failed', err));
      return;
    }
    // readings older than the newest already evaluated, not seen before: the live rules have moved on, so they
    // are evaluated for the record (the scan allocates nothing unless there are some)
    const cutoff = ev.newest();
    let older: AcceptedReading[] | null = null;
    for (const r of list) if (r.ts < cutoff && ev.unseen(r.ts)) (older ??= []).push(r);
    this.dispatch(engineId, ev.feed(list));
    this.afterStep(engineId, ev);
    if (older) {
      const engine = this.deps.directory.get(engineId);
      if (engine) this.recordLate(this.late.feed(engineId, this.factsOf(engine), this.rulesFor(engineId), older, Date.now()));
      let from = Infinity;
      let to = -Infinity;
      for (const r of older) {
        if (r.ts < from) from = r.ts;
        if (r.ts > to) to = r.ts;
      }
      ev.markSeen(from, to); // a redelivery of them is not evaluated twice
    }
    let newest = -Infinity;
    for (const r of list) if (r.ts > newest) newest = r.ts;
    const now = Date.now();
    const seen = this.arrivals.get(engineId);
    if (!seen || newest >= seen.newestTs) this.arrivals.set(engineId, { newestTs: newest, arrivedAt: now });
    // the engine's data has caught up: its alarms from late data that are still active are e-mailed now
    if (this.deps.alarms.hasPendingLate(engineId) && now - newest <= this.deps.lateAfterMs) {
      void this.deps.alarms.caughtUp(engineId).catch((err) => this.deps.log.error('alarms: late-data mail failed', err));
    }
  }

  /**
   * The rule clock of one engine. Live: now. While its data arrives late (a backfill or a gateway emptying its
   * store), time runs on from its newest reading by the wall time since that arrived, so data in transit is not
   * taken for silence; a gateway that really falls silent is still found after the usual silence.
   */
  private clockOf(engineId: number, now: number): number {
    const seen = this.arrivals.get(engineId);
    if (!seen || seen.arrivedAt - seen.newestTs <= this.deps.lateAfterMs) return now;
    return Math.min(now, seen.newestTs + Math.max(0, now - seen.arrivedAt));
  }

  /**
   * Several servers: this server took over the leases of some engines (at start, or from a server that died or
   * gave them up). Each such engine's rules are rebuilt from its stored readings over the longest span its
   * rules look back (replayMsFor; rule events of the replay are not acted on), read a few engines at a time so
   * memory stays bounded, then squared with its open alarms: an alarm still active keeps its
   * rule active so it can clear; a condition the replay found raised (or cleared) that the alarms do not show
   * yet is raised (or cleared) now, as the previous owner would have done. Live readings wait meanwhile.
   */
  async adopt(): Promise<void> {
    // before any await: engines known to be ours now hold their readings, so nothing builds them without the replay
    const early: number[] = [];
    for (const e of this.deps.directory.all()) {
      if (this.owns(e.id) && !this.evaluators.has(e.id) && !this.adopting.has(e.id)) {
        this.adopting.set(e.id, []);
        early.push(e.id);
      }
    }
    let fresh: EngineEntry[] = [];
    try {
      const engines = await this.deps.directory.refresh();
      fresh = [...engines.values()].filter(
        (e) => this.owns(e.id) && !this.evaluators.has(e.id) && (early.includes(e.id) || !this.adopting.has(e.id)) && !e.outOfService && !e.retired,
      );
      for (const id of early) if (!fresh.some((e) => e.id === id)) this.adopting.delete(id); // out of service or gone
      if (!fresh.length) return this.refreshEngines();
      for (const e of fresh) if (!this.adopting.has(e.id)) this.adopting.set(e.id, []);
      const openRows = await this.deps.alarms.loadOpen();
      const replayMs = Math.max(...fresh.map((e) => replayMsFor(this.rulesFor(e.id))));
      const perQuery = Math.max(1, Math.floor(REPLAY_READINGS_BUDGET / ((replayMs / 1000) * CHANNELS_PER_ENGINE)));
      for (let i = 0; i < fresh.length; i += perQuery) await this.adoptSome(fresh.slice(i, i + perQuery), replayMs, openRows);
    } finally {
      for (const e of fresh) this.adopting.delete(e.id);
      for (const id of early) this.adopting.delete(id);
    }
  }

  /** Rebuilds some engines taken over from their stored history, then lets their held live readings through. */
  private async adoptSome(engines: EngineEntry[], replayMs: number, openRows: Awaited<ReturnType<AlarmService['loadOpen']>>): Promise<void> {
    const stored = this.deps.storedReadings
      ? await this.deps.storedReadings(
          engines.map((e) => e.id),
          Date.now() - replayMs,
        )
      : [];
    const byEngine = new Map<number, AcceptedReading[]>();
    for (const r of stored) {
      const list = byEngine.get(r.engineId);
      if (list) list.push(r);
      else byEngine.set(r.engineId, [r]);
    }
    for (const e of engines) {
      const held = this.adopting.get(e.id) ?? [];
      this.adopting.delete(e.id);
      if (!this.owns(e.id)) continue; // lost again meanwhile
      const past = byEngine.get(e.id) ?? [];
      const newestStored = past.length ? past[past.length - 1].ts : -Infinity;
      const ev = new EngineEvaluator(this.factsOf(e), this.rulesFor(e.id), { startTs: past.length ? past[0].ts : this.deps.lastSeen(e.id) });
      this.evaluators.set(e.id, ev);
      this.facts.set(e.id, factsKey(e));
      const last = new Map<string, RuleHit>();
      for (const h of ev.feed(past)) last.set(h.def.key, h);
      const toDispatch: RuleHit[] = [];
      for (const def of this.rulesFor(e.id)) {
        const row = openRows.find((a) => a.engineId === e.id && a.rule === def.key && !a.closedAt);
        const hit = last.get(def.key);
        if (row?.active) {
          if (hit?.event.kind === 'clear') toDispatch.push(hit);
          else if (hit?.event.kind !== 'raise') ev.markActive(def.key, row.worstValue ?? null);
        } else if (hit?.event.kind === 'raise') {
          toDispatch.push(hit);
        }
      }
      this.dispatch(e.id, toDispatch);
      // live readings that came while the history was read, past what was stored
      const live = held.filter((r) => r.ts > newestStored);
      if (live.length) this.handleEngine(e.id, live);
    }
  }

  /** Several servers: leases given up (or the lease connection lost): their engines are no longer evaluated here. */
  release(): void {
    for (const id of [...this.evaluators.keys()]) {
      if (this.owns(id)) continue;
      this.evaluators.delete(id);
      this.facts.delete(id);
      this.arrivals.delete(id);
    }
    for (const id of [...this.adopting.keys()]) if (!this.owns(id)) this.adopting.delete(id);
  }

  /** A death certificate for the engine (telemetry.onLost): its no-data rule raises at once. */
  engineLost(engineId: number, at: number): void {
    if (!this.owns(engineId)) return;
    const ev = this.evaluators.get(engineId);
    if (ev) {
      this.dispatch(engineId, ev.lost(at));
      return;
    }
    if (this.outOfService.has(engineId)) return;
    // An engine added since the last refresh: pick it up (a refresh already running may predate it), then apply.
    void (async () => {
      await this.refreshEngines();
      if (!this.evaluators.has(engineId)) await this.refreshEngines();
      const added = this.evaluators.get(engineId);
      if (added) this.dispatch(engineId, added.lost(at));
    })().catch((err) => this.deps.log.error('alarms: engine refresh failed', err));
  }

  /** Findings from late readings go on record (never e-mailed). */
  private recordLate(findings: LateFinding[]): void {
    for (const f of findings) {
      const engine = this.deps.directory.get(f.engineId);
      if (!engine) continue;
      this.deps.alarms
        .recordPast(engine, f)
        .catch((err) => this.deps.log.error(`alarms: recording ${f.def.key} from late data on engine ${f.engineId} failed`, err));
    }
  }

  /** Finish late segments quiet for ALARM_LATE_AFTER_S (all with `all`): what was still raised at their end goes on record. */
  finishLate(now = Date.now(), all = false): void {
    this.recordLate(this.late.finish(now, all));
  }

  /**
   * The 1 s clock, in slices of at most `sliceMs` each, one event-loop turn apart, so that a large fleet never holds
   * the loop (at 2,000 engines one whole tick took 40-240 ms, measured with a CPU profile under the push bench,
   * and held up every reading and socket meanwhile). Each engine is ticked at the time its slice runs. Resolves
   * once every engine has had its tick.
   */
  async tickInSlices(sliceMs = 5): Promise<void> {
    const start = Date.now();
    this.finishLate(start);
    const ids = [...this.evaluators.keys()];
    let i = 0;
    while (i < ids.length) {
      const sliceStart = performance.now();
      const now = Date.now();
      for (; i < ids.length && performance.now() - sliceStart < sliceMs; i++) {
        const ev = this.evaluators.get(ids[i]);
        if (!ev) continue; // gone since the tick began
        this.dispatch(ids[i], ev.tick(this.clockOf(ids[i], now)));
        this.afterStep(ids[i], ev);
      }
      if (i < ids.length) await new Promise<void>((resolve) => setImmediate(resolve));
    }
    if (start - this.lastRefresh > DIRECTORY_REFRESH_MS) void this.refreshEngines().catch((err) => this.deps.log.error('alarms: engine refresh failed', err));
  }

  /** The 1 s clock, all engines at once (tests; the server ticks in slices). */
  tick(now = Date.now()): void {
    this.finishLate(now);
    for (const [engineId, ev] of this.evaluators) {
      this.dispatch(engineId, ev.tick(this.clockOf(engineId, now)));
      this.afterStep(engineId, ev);
    }
    if (now - this.lastRefresh > DIRECTORY_REFRESH_MS) void this.refreshEngines().catch((err) => this.deps.log.error('alarms: engine refresh failed', err));
  }

  private afterStep(engineId: number, ev: EngineEvaluator): void {
    for (const w of ev.activeWorst())
      void this.deps.alarms.updateWorst(engineId, w.key, w.worst).catch((err) => this.deps.log.error('alarms: worst value', err));
    const learned = ev.conductivityBaseline();
    if (learned !== null && ev.engine.baselineValue === null) {
      ev.engine.baselineValue = learned;
      this.baselines.set(engineId, { from: ev.engine.baselineFrom, value: learned });
      void this.deps.models.EngineBaseline.create({
        engineId,
        channel: 'coolant_conductivity',
        baselineFrom: new Date(ev.engine.baselineFrom),
        value: learned,
      }).catch((err) => this.deps.log.error('alarms: storing the conductivity baseline failed', err));
    }
  }

  private dispatch(engineId: number, hits: RuleHit[]): void {
    if (!hits.length) return;
    const engine = this.deps.directory.get(engineId);
    if (!engine) return;
    for (const h of hits) {
      const p = h.event.kind === 'raise' ? this.deps.alarms.raise(engine, h.def, h.event) : this.deps.alarms.clear(engineId, h.def, h.event);
      p.catch((err) => this.deps.log.error(`alarms: ${h.event.kind} ${h.def.key} on engine ${engineId} failed`, err));
    }
  }
}
