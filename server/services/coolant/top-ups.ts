import { Op, type Transaction } from 'sequelize';
import { CoolantInputError, estimateAfterTopUps } from '../../../shared/coolant';
import { getChemistryLimits } from './chemistry-limits';
import { badRequest } from '../../http-error';
import type { Models } from '../../models';
import type { TopUpLiquid } from '../../models/coolant-models';
import { getEngine } from '../engines';
import { getAdditiveProfile } from './additive-profile';
import type { TopUpView, TopUpsAnswer } from '../../../shared/api/coolant-view';

export interface TopUpInput {
  addedAt: Date;
  volumeL: number;
  liquid: TopUpLiquid;
  premixPercent: number | null;
  notes: string | null;
}

export type { TopUpView, TopUpsAnswer };

/** The checks of a top-up before it is stored (also used by the work-order step before it completes). */
export async function checkTopUp(
  models: Models,
  engineId: number,
  input: Pick<TopUpInput, 'volumeL' | 'liquid' | 'premixPercent'>,
  volumeField = 'volumeL',
): Promise<void> {
  const engine = await getEngine(models, engineId);
  if (engine.retiredAt) throw badRequest('engine is retired', 'engineId');
  if (!(input.volumeL > 0)) throw badRequest(`${volumeField}: above 0 L`, volumeField);
  if (input.volumeL > engine.capacityL) throw badRequest(`${volumeField}: at most the system capacity ${engine.capacityL} L`, volumeField);
  if (input.liquid === 'premix' && input.premixPercent === null) throw badRequest('premixPercent: give the glycol share of the premix', 'premixPercent');
}

/** Stores a top-up; `opts.workOrderId` links it to the work order whose step recorded it (in that step's transaction). */
export async function recordTopUp(
  models: Models,
  engineId: number,
  input: TopUpInput,
  userId: number,
  opts: { transaction?: Transaction; workOrderId?: number } = {},
): Promise<TopUpView> {
  await checkTopUp(models, engineId, input);
  const row = await models.CoolantTopUp.create(
    { engineId, ...input, premixPercent: input.liquid === 'premix' ? input.premixPercent : null, addedBy: userId, workOrderId: opts.workOrderId ?? null },
    { transaction: opts.transaction },
  );
  return view(row);
}

const view = (r: InstanceType<Models['CoolantTopUp']>): TopUpView => ({
  id: r.id,
  engineId: r.engineId,
  addedAt: new Date(r.addedAt).toISOString(),
  volumeL: r.volumeL,
  liquid: r.liquid,
  premixPercent: r.premixPercent,
  notes: r.notes,
  addedBy: r.addedBy,
  workOrderId: r.workOrderId ?? null,
});

/** The engine's top-ups (newest first) and the additive and glycol estimated since its last test. */
export async function listTopUps(models: Models, engineId: number): Promise<TopUpsAnswer> {
  const engine = await getEngine(models, engineId);
  const rows = await models.CoolantTopUp.findAll({
    where: { engineId },
    order: [
      ['addedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 500,
  });
  const test = await models.CoolantTest.findOne({
    where: { engineId, [Op.or]: [{ scaUnitsPerGal: { [Op.ne]: null } }, { glycolPercent: { [Op.ne]: null } }, { nitritePpm: { [Op.ne]: null } }] },
    order: [
      ['testedAt', 'DESC'],
      ['id', 'DESC'],
    ],
  });
  if (!test) return { topUps: rows.map(view), estimate: null };
  const since = rows.filter((r) => new Date(r.addedAt).getTime() > new Date(test.testedAt).getTime()).reverse();
  const profile = await getAdditiveProfile(models);
  const chem = (await getChemistryLimits(models)).limits;
  const elc = engine.coolantFamily === 'extended-life';
  try {
    const e = estimateAfterTopUps({
      capacityL: engine.capacityL,
      scaUnitsPerGal: elc ? null : test.scaUnitsPerGal,
      // the nitrite limits are for conventional coolant (some extended-life coolants carry none)
      nitritePpm: elc ? null : (test.nitritePpm ?? null),
      nitriteLowPpm: chem.nitriteLowPpm,
      glycolPercent: test.glycolPercent,
      topUps: since.map((r) => ({ volumeL: Math.min(r.volumeL, engine.capacityL), liquid: r.liquid, premixPercent: r.premixPercent })),
      lowUnitsPerGal: profile.limits.low,
    });
    return { topUps: rows.map(view), estimate: { ...e, basedOnTestAt: new Date(test.testedAt).toISOString(), topUpsSince: since.length } };
  } catch (err) {
    if (err instanceof CoolantInputError) return { topUps: rows.map(view), estimate: null };
    throw err;
  }
}
