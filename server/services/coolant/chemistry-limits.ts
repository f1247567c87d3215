import { CoolantInputError, DEFAULT_CHEMISTRY_LIMITS, resolveChemistryLimits, type ChemistryLimits } from '../../../shared/coolant';
import { badRequest } from '../../http-error';
import type { Models } from '../../models';
import { DEFAULT_EXTENDER_INTERVAL } from '../../../shared/service/due-list';

export interface ExtenderInterval {
  everyHours: number | null;
  everyDays: number | null;
}

export interface ChemistryLimitsView {
  limits: ChemistryLimits;
  defaults: ChemistryLimits;
  /** Extended-life coolant extender interval for the service plan; null = the common-practice default (shown in extenderDefault). */
  extender: ExtenderInterval | null;
  extenderDefault: ExtenderInterval;
  /** False while the defaults are in force. */
  configured: boolean;
  updatedAt: string | null;
}

/** The admin's coolant chemistry limits (shared defaults until set). */
export async function getChemistryLimits(models: Models): Promise<ChemistryLimitsView> {
  const row = await models.CoolantSettings.findOne({ order: [['id', 'ASC']] });
  return {
    limits: resolveChemistryLimits(row?.chemistryLimits as Partial<ChemistryLimits> | undefined),
    defaults: { ...DEFAULT_CHEMISTRY_LIMITS },
    extender: row?.extenderInterval ?? null,
    extenderDefault: { ...DEFAULT_EXTENDER_INTERVAL },
    configured: !!row,
    updatedAt: row?.updatedAt ? new Date(row.updatedAt).toISOString() : null,
  };
}

/** Limits (missing keys take the defaults) and, when given, the extender interval (null = back to the default). */
export async function saveChemistryLimits(
  models: Models,
  input: Partial<ChemistryLimits> & { extender?: ExtenderInterval | null },
  userId: number,
): Promise<ChemistryLimitsView> {
  const { extender, ...limitInput } = input;
  if (extender && extender.everyHours === null && extender.everyDays === null)
    throw badRequest('extender: give everyHours, everyDays or both (or null for the default)', 'extender');
  let limits: ChemistryLimits;
  try {
    limits = resolveChemistryLimits(limitInput);
  } catch (err) {
    if (err instanceof CoolantInputError) throw badRequest(err.message, err.field);
    throw err;
  }
  const row = await models.CoolantSettings.findOne({ order: [['id', 'ASC']] });
  const values = { chemistryLimits: { ...limits }, updatedBy: userId, ...(extender !== undefined ? { extenderInterval: extender } : {}) };
  if (row) await row.update(values);
  else await models.CoolantSettings.create(values);
  return getChemistryLimits(models);
}
