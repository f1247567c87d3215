import { QueryTypes } from 'sequelize';
import { judgeChemistry, type ChemistryLimits } from '../../../shared/coolant';
import type { EngineFreezeStatus } from '../../../shared/api/coolant-view';
import type { Engine, Models } from '../../models';
import { getChemistryLimits } from './chemistry-limits';

export type { EngineFreezeStatus };

/**
 * Each engine's freeze protection from its latest coolant test that has a glycol or freeze-point reading, judged
 * against its site's design low temperature and today's margin (so a changed design low or margin shows at once).
 * One query for the latest test ids (window function, SQLite 3.25+ and PostgreSQL), one for the rows.
 */
export async function freezeStatusOf(models: Models, engines: Engine[], limits?: ChemistryLimits): Promise<Map<number, EngineFreezeStatus>> {
  const out = new Map<number, EngineFreezeStatus>();
  if (!engines.length) return out;
  const sequelize = models.CoolantTest.sequelize!;
  const ids = engines.map((e) => e.id);
  const latest = await sequelize.query<{ id: number }>(
    `SELECT id FROM (
       SELECT id, ROW_NUMBER() OVER (PARTITION BY engine_id ORDER BY tested_at DESC, id DESC) AS rn
       FROM coolant_tests WHERE engine_id IN (:ids) AND (glycol_percent IS NOT NULL OR freeze_point_c IS NOT NULL)
     ) latest WHERE rn = 1`,
    { replacements: { ids }, type: QueryTypes.SELECT },
  );
  if (!latest.length) return out;
  const tests = await models.CoolantTest.findAll({ where: { id: latest.map((r) => Number(r.id)) } });
  const l = limits ?? (await getChemistryLimits(models)).limits;
  const sites = new Map(
    (await models.Site.findAll({ where: { id: [...new Set(engines.map((e) => e.siteId))] }, attributes: ['id', 'designLowTempC'] })).map((s) => [
      s.id,
      s.designLowTempC ?? null,
    ]),
  );
  const byId = new Map(engines.map((e) => [e.id, e]));
  for (const t of tests) {
    const engine = byId.get(t.engineId);
    if (!engine) continue;
    const designLowC = sites.get(engine.siteId) ?? null;
    try {
      const [f] = judgeChemistry(
        { glycolPercent: t.glycolPercent, freezePointC: t.freezePointC },
        { glycolType: engine.glycolType, coolantFamily: engine.coolantFamily, designLowC },
        l,
      );
      if (!f) continue;
      out.set(engine.id, {
        status: f.status === 'low' ? 'short' : (f.status as EngineFreezeStatus['status']),
        freezePointC: f.value,
        requiredC: designLowC === null ? null : designLowC - l.freezeMarginK,
        designLowC,
        marginK: l.freezeMarginK,
        testId: t.id,
        testedAt: new Date(t.testedAt).toISOString(),
        message: f.message,
        action: f.action,
      });
    } catch {
      // a stored reading the table cannot judge (older record): no verdict rather than a broken fleet list
    }
  }
  return out;
}
