import { CoolantInputError, DEFAULT_CHEMISTRY_LIMITS, resolveChemistryLimits, type ChemistryLimits } from '../../../shared/coolant';
import { badRequest } from '../../http-error';
import type { Models } from '../../models';

export interface ChemistryLimitsView {
  limits: ChemistryLimits;
  defaults: ChemistryLimits;
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
    configured: !!row,
    updatedAt: row?.updatedAt ? new Date(row.updatedAt).toISOString() : null,
  };
}

export async function saveChemistryLimits(models: Models, input: Partial<ChemistryLimits>, userId: number): Promise<ChemistryLimitsView> {
  let limits: ChemistryLimits;
  try {
    limits = resolveChemistryLimits(input);
  } catch (err) {
    if (err instanceof CoolantInputError) throw badRequest(err.message, err.field);
    throw err;
  }
  const row = await models.CoolantSettings.findOne({ order: [['id', 'ASC']] });
  const values = { chemistryLimits: { ...limits }, updatedBy: userId };
  if (row) await row.update(values);
  else await models.CoolantSettings.create(values);
  return getChemistryLimits(models);
}
