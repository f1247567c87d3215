/** Demo on-call rota: the demo technician on call for every site, the planner as backup, in weekly shifts. */
import type { Transaction } from 'sequelize';
import type { Models } from '../server/models';

const WEEK = 7 * 86400_000;
export const DEMO_ONCALL_WEEKS = 26;

export async function seedOncall(
  models: Models,
  opts: { transaction?: Transaction; now?: number; technician?: string; backup?: string } = {},
): Promise<number> {
  const { transaction } = opts;
  const tech = await models.User.findOne({ where: { email: opts.technician ?? 'tech@jacketwatch.test' }, transaction });
  const backup = await models.User.findOne({ where: { email: opts.backup ?? 'planner@jacketwatch.test' }, transaction });
  if (!tech) return 0;
  const sites = await models.Site.findAll({ where: { retiredAt: null }, transaction });
  // weeks start on the Monday 00:00 UTC before now
  const now = opts.now ?? Date.now();
  const d = new Date(now);
  const monday = Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate()) - ((d.getUTCDay() + 6) % 7) * 86400_000;
  const rows = sites.flatMap((s) =>
    Array.from({ length: DEMO_ONCALL_WEEKS }, (_, w) => ({
      siteId: s.id,
      userId: tech.id,
      backupUserId: backup?.id ?? null,
      startsAt: new Date(monday + w * WEEK),
      endsAt: new Date(monday + (w + 1) * WEEK),
    })),
  );
  await models.OncallShift.bulkCreate(rows, { transaction });
  return rows.length;
}
