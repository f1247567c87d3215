import { Op, fn, col, where as sqlWhere, type Sequelize, type WhereOptions } from 'sequelize';
import { z } from 'zod';
import type { Models } from '../models';

/**
 * Server paging of the long lists (work orders, due list, engines, alarms): one style for all of them,
 * `offset` and `limit`. A request that sends `offset` (0 for the first page) is answered with one page
 * `{ items, total, limit, offset }`; without `offset` the list keeps its older whole-list answer.
 */
export const PAGE_DEFAULT_LIMIT = 50;
export const PAGE_MAX_LIMIT = 500;
/** Far beyond any real list; keeps a typing slip from becoming a huge OFFSET. */
export const PAGE_MAX_OFFSET = 1_000_000;

export interface Page<T> {
  items: T[];
  /** Rows matching the filters over all pages, so a page can say "1-50 of 1,234". */
  total: number;
  limit: number;
  offset: number;
}

/** Messages without the field's name: the 400 reads "limit: must be at most 500". */
const whole = (min: number, max: number) =>
  z.coerce
    .number({ error: `must be a whole number from ${min} to ${max}` })
    .int(`must be a whole number from ${min} to ${max}`)
    .min(min, `must be at least ${min}`)
    .max(max, `must be at most ${max}`);

/** Query fields of a paged list: limit, offset and the text filter q (all optional). */
export const pageFields = {
  limit: whole(1, PAGE_MAX_LIMIT).optional(),
  offset: whole(0, PAGE_MAX_OFFSET).optional(),
  q: z
    .string()
    .trim()
    .max(100, 'at most 100 characters')
    .optional()
    .transform((s) => (s ? s : undefined)),
};

export interface PageRequest {
  limit: number;
  offset: number;
}

/** The page asked for, or null for the older whole-list answer (no offset sent). */
export function pageOf(q: { limit?: number; offset?: number }): PageRequest | null {
  if (q.offset === undefined) return null;
  return { limit: q.limit ?? PAGE_DEFAULT_LIMIT, offset: q.offset };
}

/**
 * Case-insensitive "contains" on a column, with no LIKE wildcards to escape: instr (SQLite) or strpos
 * (PostgreSQL) of the lower-cased text.
 */
export function containsText(sequelize: Sequelize, column: string, text: string): WhereOptions {
  const f = sequelize.getDialect() === 'postgres' ? 'strpos' : 'instr';
  return sqlWhere(fn(f, fn('lower', col(column)), text.toLowerCase()), Op.gt, 0);
}

/** Ids of the engines whose own name or site name contains the text (retired ones too: old rows keep their engine). */
export async function engineIdsMatching(models: Models, sequelize: Sequelize, text: string): Promise<number[]> {
  const sites = await models.Site.findAll({ where: containsText(sequelize, 'name', text), attributes: ['id'], raw: true });
  const or: WhereOptions[] = [containsText(sequelize, 'name', text)];
  if (sites.length) or.push({ siteId: sites.map((s) => s.id) });
  const engines = await models.Engine.findAll({ where: { [Op.or]: or }, attributes: ['id'], raw: true });
  return engines.map((e) => e.id);
}

/** Slices an already ordered array (lists whose rows are computed, not stored). */
export function slicePage<T>(rows: T[], page: PageRequest): Page<T> {
  return { items: rows.slice(page.offset, page.offset + page.limit), total: rows.length, limit: page.limit, offset: page.offset };
}
