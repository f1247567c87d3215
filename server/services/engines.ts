import type { InferCreationAttributes } from 'sequelize';
import type { ChannelKey } from '../../shared/channels';
import { badRequest, notFound } from '../http-error';
import type { Engine, Models } from '../models';
import type { LatestValue, LiveState, RunState } from '../telemetry/types';

export type EngineInput = Omit<InferCreationAttributes<Engine>, 'id' | 'retiredAt' | 'createdAt' | 'updatedAt'>;

export interface EngineView extends ReturnType<Engine['toJSON']> {
  latest: Partial<Record<ChannelKey, LatestValue>>;
  /** ms since epoch of the last reading the live state saw, null when none. */
  lastSeenAt: number | null;
  runState: RunState;
}

/** Model fields plus what the live state knows right now. */
export function engineView(engine: Engine, live: LiveState | null): EngineView {
  return {
    ...(engine.toJSON() as ReturnType<Engine['toJSON']>),
    latest: live ? live.latest(engine.id) : {},
    lastSeenAt: live ? live.lastSeen(engine.id) : null,
    runState: live ? live.runState(engine.id) : 'no-data',
  };
}

/** `siteIds` (the caller's visible sites) narrows the list; `siteId` picks one site. */
export function listEngines(models: Models, opts: { siteId?: number; siteIds?: number[]; includeRetired?: boolean } = {}): Promise<Engine[]> {
  const where: Record<string, unknown> = {};
  if (!opts.includeRetired) where.retiredAt = null;
  if (opts.siteIds !== undefined) where.siteId = opts.siteId === undefined ? opts.siteIds : opts.siteIds.filter((id) => id === opts.siteId);
  else if (opts.siteId !== undefined) where.siteId = opts.siteId;
  return models.Engine.findAll({
    where,
    order: [
      ['siteId', 'ASC'],
      ['name', 'ASC'],
    ],
  });
}

export async function getEngine(models: Models, id: number): Promise<Engine> {
  const engine = await models.Engine.findByPk(id);
  if (!engine) throw notFound('engine');
  return engine;
}

async function ensureSite(models: Models, siteId: number): Promise<void> {
  const site = await models.Site.findByPk(siteId);
  if (!site || site.retiredAt) throw badRequest('site does not exist or is retired', 'siteId');
}

export async function createEngine(models: Models, input: EngineInput): Promise<Engine> {
  await ensureSite(models, input.siteId);
  return models.Engine.create(input);
}

export async function updateEngine(models: Models, id: number, patch: Partial<EngineInput>): Promise<Engine> {
  const engine = await getEngine(models, id);
  if (patch.siteId !== undefined && patch.siteId !== engine.siteId) await ensureSite(models, patch.siteId);
  return engine.update(patch);
}

export async function retireEngine(models: Models, id: number): Promise<Engine> {
  const engine = await getEngine(models, id);
  return engine.retiredAt ? engine : engine.update({ retiredAt: new Date() });
}

/** siteId of an engine (live-push rooms); null when unknown. Cached: engines rarely move. */
export function siteOfEngineLookup(models: Models): (engineId: number) => Promise<number | null> {
  const cache = new Map<number, number>();
  return async (engineId) => {
    const hit = cache.get(engineId);
    if (hit !== undefined) return hit;
    const engine = await models.Engine.findByPk(engineId, { attributes: ['id', 'siteId'] });
    if (!engine) return null;
    cache.set(engineId, engine.siteId);
    return engine.siteId;
  };
}
