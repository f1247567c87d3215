/**
 * Readiness of standby engines for the engine list and page: gathers the facts (latest values, open
 * high/urgent alarms, open lockouts on work orders, the cold limit in force) and asks shared/readiness.
 */
import { Op } from 'sequelize';
import { standbyReadiness, STANDBY_MIN_TEMP_C, type Readiness } from '../../shared/readiness/standby-readiness';
import type { Models } from '../models';
import type { Engine } from '../models/engine';
import type { LiveState } from '../telemetry/types';
import { NO_DATA_AFTER_MS } from '../telemetry/live-state';
import { DEFAULT_RULES, effectiveRules, type RuleDefinition } from './alarms/rule-definitions';

const RULE = 'coolant_temp_low_standby';

/** The cold limit in force for each engine (profile + override), °C. */
async function coldLimits(models: Models, ids: number[]): Promise<Map<number, number>> {
  const profile = await models.RuleProfile.findOne({ where: { isDefault: true } });
  const rules = profile ? ((typeof profile.rules === 'string' ? JSON.parse(profile.rules) : profile.rules) as RuleDefinition[]) : DEFAULT_RULES;
  const overrides = await models.EngineRule.findAll({ where: { engineId: ids, rule: RULE } });
  const out = new Map<number, number>();
  for (const id of ids) {
    const o = overrides
      .filter((r) => r.engineId === id)
      .map((r) => ({ rule: r.rule, enabled: r.enabled, params: typeof r.params === 'string' ? JSON.parse(r.params) : r.params }));
    const def = effectiveRules(rules, o).find((r) => r.key === RULE) ?? DEFAULT_RULES.find((r) => r.key === RULE);
    const limit = def?.params.limit;
    out.set(id, typeof limit === 'number' ? limit : STANDBY_MIN_TEMP_C);
  }
  return out;
}

/** Readiness of every standby engine in `engines` (others are absent from the map). */
export async function standbyReadinessOf(models: Models, engines: Engine[], live: LiveState | null, now = Date.now()): Promise<Map<number, Readiness>> {
  const standby = engines.filter((e) => e.duty === 'standby' && !e.retiredAt);
  const out = new Map<number, Readiness>();
  if (!standby.length) return out;
  const ids = standby.map((e) => e.id);
  const [limits, alarms, orders] = await Promise.all([
    coldLimits(models, ids),
    models.Alarm.findAll({
      where: { engineId: ids, closedAt: null, active: true, priority: ['high', 'urgent'] },
      attributes: ['engineId', 'rule', 'priority'],
    }),
    models.WorkOrder.findAll({ where: { engineId: ids, status: { [Op.in]: ['in-progress', 'waiting-sign-off'] } }, attributes: ['id', 'engineId', 'title'] }),
  ]);
  const locked = orders.length
    ? new Set(
        (await models.WorkOrderStep.findAll({ where: { workOrderId: orders.map((o) => o.id), lockoutConfirmed: true }, attributes: ['workOrderId'] })).map(
          (s) => s.workOrderId,
        ),
      )
    : new Set<number>();
  const title = (rule: string) => DEFAULT_RULES.find((r) => r.key === rule)?.title ?? rule.replace(/_/g, ' ');
  for (const e of standby) {
    const latest = live ? live.latest(e.id) : {};
    const t = latest.coolant_temp;
    out.set(
      e.id,
      standbyReadiness({
        outOfService: e.outOfService,
        coolantTempC: t && t.quality === 0 ? t.value : null,
        coolantTs: t && t.quality === 0 ? t.ts : null,
        lastSeenAt: live ? live.lastSeen(e.id) : null,
        running: live ? live.runState(e.id, now) === 'running' : false,
        // every latest value bad: the gateway declared its data lost (or all sensors failed)
        dataLost: Object.values(latest).length > 0 && Object.values(latest).every((v) => v.quality !== 0),
        minTempC: limits.get(e.id) ?? STANDBY_MIN_TEMP_C,
        urgentAlarms: alarms.filter((a) => a.engineId === e.id).map((a) => ({ title: title(a.rule), priority: a.priority })),
        lockouts: orders.filter((o) => o.engineId === e.id && locked.has(o.id)).map((o) => ({ workOrderId: o.id, title: o.title })),
        staleAfterMs: NO_DATA_AFTER_MS,
        now,
      }),
    );
  }
  return out;
}
