import { DEFAULT_SCA_LIMITS, type ScaLimits } from '../../../shared/coolant';
import type { Models } from '../../models';
import type { FilterSize } from '../../models/coolant-models';

export interface AdditiveProfileView {
  /** False until an administrator has entered the figures from the additive's label. */
  configured: boolean;
  name: string;
  /** Strength of the liquid additive, units per litre of liquid (from its label); null when not set. */
  liquidUnitsPerLitre: number | null;
  /** Charged filter sizes and the additive units each releases (from the filter's data). */
  filterSizes: FilterSize[];
  limits: ScaLimits;
  updatedAt: string | null;
}

export interface AdditiveProfileInput {
  name: string;
  liquidUnitsPerLitre: number;
  filterSizes: FilterSize[];
  scaLow: number;
  scaHigh: number;
}

/** The one additive profile in use. Until set, no strength is assumed: the label's figure is needed. */
export async function getAdditiveProfile(models: Models): Promise<AdditiveProfileView> {
  const row = await models.AdditiveProfile.findOne({ order: [['id', 'ASC']] });
  if (!row) {
    return { configured: false, name: 'Not set', liquidUnitsPerLitre: null, filterSizes: [], limits: { ...DEFAULT_SCA_LIMITS }, updatedAt: null };
  }
  return {
    configured: true,
    name: row.name,
    liquidUnitsPerLitre: row.liquidUnitsPerLitre,
    filterSizes: row.filterSizes ?? [],
    limits: { low: row.scaLow, high: row.scaHigh },
    updatedAt: row.updatedAt ? new Date(row.updatedAt).toISOString() : null,
  };
}

export async function saveAdditiveProfile(models: Models, input: AdditiveProfileInput, userId: number): Promise<AdditiveProfileView> {
  const row = await models.AdditiveProfile.findOne({ order: [['id', 'ASC']] });
  const values = { ...input, updatedBy: userId };
  if (row) await row.update(values);
  else await models.AdditiveProfile.create(values);
  return getAdditiveProfile(models);
}
