/**
 * Rule profile and per-engine overrides (administrators), and the preview that runs a rule over an
 * engine's stored readings to show what it would have raised.
 */
import type { Sequelize } from 'sequelize';
import { CHANNELS, type ChannelKey } from '../../../shared/channels';
import { badRequest, notFound } from '../../http-error';
import type { Models } from '../../models';
import { EngineEvaluator, type EngineFacts, type EvalReading } from './engine-evaluator';
import type { RuleEngine } from './rule-engine';
import { effectiveRules, type RuleDefinition, type RuleOverride } from './rule-definitions';
import { readRawRange } from '../history/raw-range';

export interface EngineRulesView {
  engineId: number;
  rules: (RuleDefinition & { overridden: boolean; override: RuleOverride | null })[];
}

export async function saveProfile(models: Models, engine: RuleEngine, rules: RuleDefinition[]): Promise<RuleDefinition[]> {
  const keys = new Set<string>();
  for (const [i, r] of rules.entries()) {
    if (keys.has(r.key)) throw badRequest(`rule key ${r.key} appears twice`, `rules.${i}.key`);
    keys.add(r.key);
  }
  const row = await models.RuleProfile.findOne({ where: { isDefault: true } });
  if (!row) throw notFound('default rule profile');
  await row.update({ rules });
  await engine.reloadRules();
  return engine.profileRules();
}

export async function engineRules(models: Models, engine: RuleEngine, engineId: number): Promise<EngineRulesView> {
  if (!(await models.Engine.findByPk(engineId))) throw notFound('engine');
  const rows = await models.EngineRule.findAll({ where: { engineId } });
  const overrides = new Map(
    rows.map((r) => [
      r.rule,
      { rule: r.rule, enabled: r.enabled, params: (typeof r.params === 'string' ? JSON.parse(r.params) : r.params) as Record<string, unknown> | null },
    ]),
  );
  const eff = effectiveRules(engine.profileRules(), [...overrides.values()]);
  return { engineId, rules: eff.map((d) => ({ ...d, overridden: overrides.has(d.key), override: overrides.get(d.key) ?? null })) };
}

/** Replace an engine's overrides with this list (an empty list goes back to the profile). */
export async function saveEngineRules(
  models: Models,
  sequelize: Sequelize,
  engine: RuleEngine,
  engineId: number,
  overrides: RuleOverride[],
): Promise<EngineRulesView> {
  if (!(await models.Engine.findByPk(engineId))) throw notFound('engine');
  const known = new Set(engine.profileRules().map((r) => r.key));
  for (const [i, o] of overrides.entries()) if (!known.has(o.rule)) throw badRequest(`no rule ${o.rule} in the profile`, `rules.${i}.rule`);
  await sequelize.transaction(async (transaction) => {
    await models.EngineRule.destroy({ where: { engineId }, transaction });
    for (const o of overrides) await models.EngineRule.create({ engineId, rule: o.rule, enabled: o.enabled, params: o.params }, { transaction });
  });
  await engine.reloadRules();
  return engineRules(models, engine, engineId);
}

export interface PreviewResult {
  engineId: number;
  rule: string;
  from: string;
  to: string;
  readings: number;
  alarms: { raisedAt: string; clearedAt: string | null; value: number | null; message: string }[];
}

const PAGE = 5000;

/** One channel's stored readings (raw and compacted) in time order, a page at a time (keyset on the timestamp). */
async function* channelRows(sequelize: Sequelize, engineId: number, channel: ChannelKey, from: number, to: number): AsyncGenerator<EvalReading[]> {
  const code = CHANNELS[channel].code;
  let after = from - 1;
  for (;;) {
    // (after, to] as [after + 1, to + 1): timestamps are whole milliseconds
    const rows = await readRawRange(sequelize, engineId, code, after + 1, to + 1, { limit: PAGE });
    if (!rows.length) return;
    yield rows.map((r) => ({ channel, ts: r.ts, value: r.value, quality: r.quality ? 1 : 0 }));
    after = rows[rows.length - 1].ts;
    if (rows.length < PAGE) return;
  }
}

/** Merge several channels' pages into one time-ordered stream of batches. */
async function* merged(sequelize: Sequelize, engineId: number, channels: ChannelKey[], from: number, to: number): AsyncGenerator<EvalReading[]> {
  const its = channels.map((c) => channelRows(sequelize, engineId, c, from, to));
  const bufs: EvalReading[][] = channels.map(() => []);
  const done = channels.map(() => false);
  const fill = async (i: number) => {
    while (!done[i] && bufs[i].length === 0) {
      const n = await its[i].next();
      if (n.done) done[i] = true;
      else bufs[i] = n.value;
    }
  };
  for (;;) {
    await Promise.all(channels.map((_, i) => fill(i)));
    const live = bufs.map((b, i) => i).filter((i) => bufs[i].length);
    if (!live.length) return;
    // everything up to the earliest page end is safe to hand out in order
    const until = Math.min(...live.map((i) => bufs[i][bufs[i].length - 1].ts));
    const out: EvalReading[] = [];
    for (const i of live) {
      let k = 0;
      while (k < bufs[i].length && bufs[i][k].ts <= until) k++;
      out.push(...bufs[i].slice(0, k));
      bufs[i] = bufs[i].slice(k);
    }
    out.sort((a, b) => a.ts - b.ts);
    yield out;
  }
}

/** Run one rule (the engine's, or with other parameters) over the engine's stored readings from `from` to `to`. */
export async function previewRule(
  models: Models,
  sequelize: Sequelize,
  engine: RuleEngine,
  q: { engineId: number; rule: string; params?: Record<string, unknown>; from: number; to: number },
): Promise<PreviewResult> {
  const e = await models.Engine.findByPk(q.engineId);
  if (!e) throw notFound('engine');
  const base = engine.rulesFor(q.engineId).find((r) => r.key === q.rule);
  if (!base) throw badRequest(`no rule ${q.rule}`, 'rule');
  const def: RuleDefinition = { ...base, enabled: true, params: { ...base.params, ...(q.params ?? {}) } };
  const bl = await models.EngineBaseline.findOne({ where: { engineId: q.engineId, channel: 'coolant_conductivity' }, order: [['baselineFrom', 'DESC']] });
  const facts: EngineFacts = {
    id: e.id,
    glycolType: e.glycolType,
    glycolPercent: e.glycolPercent,
    baselineFrom: bl ? new Date(bl.baselineFrom).getTime() : q.from,
    baselineValue: bl ? bl.value : null,
  };
  const ev = new EngineEvaluator(facts, [def], { startTs: null });
  const channels: ChannelKey[] =
    def.kind === 'no_data'
      ? (Object.keys(CHANNELS) as ChannelKey[])
      : [...new Set<ChannelKey>([def.channel, 'engine_speed', ...(def.kind === 'boiling_margin' ? (['coolant_pressure'] as ChannelKey[]) : [])])];
  const found: PreviewResult['alarms'] = [];
  let count = 0;
  const take = (hits: ReturnType<EngineEvaluator['feed']>) => {
    for (const h of hits) {
      if (h.event.kind === 'raise')
        found.push({ raisedAt: new Date(h.event.ts).toISOString(), clearedAt: null, value: h.event.value, message: h.event.message });
      else if (found.length && found[found.length - 1].clearedAt === null) found[found.length - 1].clearedAt = new Date(h.event.ts).toISOString();
    }
  };
  for await (const batch of merged(sequelize, q.engineId, channels, q.from, q.to)) {
    count += batch.length;
    take(ev.feed(batch));
  }
  take(ev.tick(Math.min(q.to, Date.now())));
  return { engineId: q.engineId, rule: q.rule, from: new Date(q.from).toISOString(), to: new Date(q.to).toISOString(), readings: count, alarms: found };
}
