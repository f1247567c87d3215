/**
 * The one answer to "which sites may this user see". Admins see every site; a user with no
 * user_sites rows sees every site (set-ups made before site access existed keep working); a user
 * with rows sees only those sites. Anything of another site reads as not found (404), never
 * forbidden, so its ids do not leak.
 */
import type { Request } from 'express';
import type { AppContext } from '../app-context';
import { notFound } from '../http-error';
import type { Models } from '../models';
import type { AuthUser } from '../telemetry/types';

export interface SiteScope {
  /** True when the user sees every site (then siteIds is empty). */
  readonly all: boolean;
  readonly siteIds: readonly number[];
}

export const ALL_SITES: SiteScope = Object.freeze({ all: true, siteIds: Object.freeze([]) as readonly number[] });

export async function siteScopeForUser(models: Models, user: Pick<AuthUser, 'id' | 'role'>): Promise<SiteScope> {
  if (user.role === 'admin') return ALL_SITES;
  const rows = await models.UserSite.findAll({ where: { userId: user.id }, attributes: ['siteId'] });
  if (!rows.length) return ALL_SITES;
  return { all: false, siteIds: rows.map((r) => r.siteId).sort((a, b) => a - b) };
}

const perRequest = new WeakMap<Request, Promise<SiteScope>>();

/** The signed-in user's scope, looked up once per request (use after requireAuth). */
export function siteScopeOf(req: Request): Promise<SiteScope> {
  let hit = perRequest.get(req);
  if (!hit) {
    if (!req.user) throw new Error('siteScopeOf needs requireAuth first');
    hit = siteScopeForUser((req.app.locals.ctx as AppContext).models, req.user);
    perRequest.set(req, hit);
  }
  return hit;
}

export const maySeeSite = (scope: SiteScope, siteId: number | null | undefined): boolean =>
  scope.all || (siteId !== null && siteId !== undefined && scope.siteIds.includes(siteId));

/** Site ids to filter a list by: null for every site; `wanted` (a query's siteId) narrowed to the scope. */
export function siteFilter(scope: SiteScope, wanted?: number): number[] | null {
  if (wanted !== undefined) return maySeeSite(scope, wanted) ? [wanted] : [];
  return scope.all ? null : [...scope.siteIds];
}

/** Ids of every engine (retired too) the scope sees; null for all. */
export async function visibleEngineIds(models: Models, scope: SiteScope): Promise<number[] | null> {
  if (scope.all) return null;
  const engines = await models.Engine.findAll({ where: { siteId: [...scope.siteIds] }, attributes: ['id'] });
  return engines.map((e) => e.id);
}

/** Whether the engine exists and its site is in scope. */
export async function engineVisible(models: Models, scope: SiteScope, engineId: number): Promise<boolean> {
  const engine = await models.Engine.findByPk(engineId, { attributes: ['id', 'siteId'] });
  return !!engine && maySeeSite(scope, engine.siteId);
}

/**
 * 404 when the engine is of a site out of scope. An engine that does not exist is left to the
 * service (its own 404 or 400), so unknown and hidden read the same.
 */
export async function assertEngineVisible(models: Models, scope: SiteScope, engineId: number | null | undefined, what = 'engine'): Promise<void> {
  if (scope.all || engineId === null || engineId === undefined) return;
  const engine = await models.Engine.findByPk(engineId, { attributes: ['id', 'siteId'] });
  if (engine && !maySeeSite(scope, engine.siteId)) throw notFound(what);
}

export async function assertAlarmVisible(models: Models, scope: SiteScope, alarmId: number): Promise<void> {
  if (scope.all) return;
  const alarm = await models.Alarm.findByPk(alarmId, { attributes: ['id', 'engineId'] });
  if (alarm) await assertEngineVisible(models, scope, alarm.engineId, 'alarm');
}

export async function assertWorkOrderVisible(models: Models, scope: SiteScope, workOrderId: number): Promise<void> {
  if (scope.all) return;
  const order = await models.WorkOrder.findByPk(workOrderId, { attributes: ['id', 'engineId'] });
  if (order) await assertEngineVisible(models, scope, order.engineId, 'work order');
}

export async function assertAttachmentVisible(models: Models, scope: SiteScope, attachmentId: number): Promise<void> {
  if (scope.all) return;
  const a = await models.Attachment.findByPk(attachmentId, { attributes: ['id', 'workOrderId'] });
  if (!a) return;
  const order = await models.WorkOrder.findByPk(a.workOrderId, { attributes: ['id', 'engineId'] });
  if (order) await assertEngineVisible(models, scope, order.engineId, 'attachment');
}

/** Replace a user's sites (admin). An empty list means every site again. */
export async function setUserSites(models: Models, userId: number, siteIds: number[]): Promise<number[]> {
  const ids = [...new Set(siteIds)].sort((a, b) => a - b);
  await models.User.sequelize!.transaction(async (transaction) => {
    await models.UserSite.destroy({ where: { userId }, transaction });
    if (ids.length)
      await models.UserSite.bulkCreate(
        ids.map((siteId) => ({ userId, siteId })),
        { transaction },
      );
  });
  return ids;
}

/** Site ids per user id (users without rows are absent: they see every site). */
export async function sitesByUser(models: Models, userIds?: number[]): Promise<Map<number, number[]>> {
  const rows = await models.UserSite.findAll({ where: userIds ? { userId: userIds } : {}, order: [['siteId', 'ASC']] });
  const out = new Map<number, number[]>();
  for (const r of rows) {
    let list = out.get(r.userId);
    if (!list) out.set(r.userId, (list = []));
    list.push(r.siteId);
  }
  return out;
}

/**
 * Ids of the users a scope may see in people pickers and the rota: everyone for an all-sites scope;
 * otherwise users who share one of its sites, users without site rows (they work at every site) and
 * admins. Null means every user.
 */
export async function visibleUserIds(models: Models, scope: SiteScope): Promise<number[] | null> {
  if (scope.all) return null;
  const limited = await sitesByUser(models);
  const users = await models.User.findAll({ attributes: ['id', 'role'] });
  const mine = new Set(scope.siteIds);
  return users.filter((u) => u.role === 'admin' || !limited.has(u.id) || limited.get(u.id)!.some((id) => mine.has(id))).map((u) => u.id);
}
