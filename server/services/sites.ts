import { notFound } from '../http-error';
import type { Models, Site } from '../models';
import { ALL_SITES, type SiteScope } from './site-access';

export interface SiteInput {
  name: string;
  timeZone: string;
  designLowTempC?: number | null;
  /** Metres above mean sea level (null: unknown). */
  elevationM?: number | null;
}

export function listSites(models: Models, includeRetired = false, scope: SiteScope = ALL_SITES): Promise<Site[]> {
  const where: Record<string, unknown> = includeRetired ? {} : { retiredAt: null };
  if (!scope.all) where.id = [...scope.siteIds];
  return models.Site.findAll({ where, order: [['name', 'ASC']] });
}

export async function getSite(models: Models, id: number): Promise<Site> {
  const site = await models.Site.findByPk(id);
  if (!site) throw notFound('site');
  return site;
}

export const createSite = (models: Models, input: SiteInput) => models.Site.create(input);

export async function updateSite(models: Models, id: number, patch: Partial<SiteInput>): Promise<Site> {
  return (await getSite(models, id)).update(patch);
}

/** Retire rather than delete: readings and records stay attached. */
export async function retireSite(models: Models, id: number): Promise<Site> {
  const site = await getSite(models, id);
  return site.retiredAt ? site : site.update({ retiredAt: new Date() });
}
