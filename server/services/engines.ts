import type { InferCreationAttributes, WhereOptions } from 'sequelize';
import type { ChannelKey } from '../../shared/channels';
import { badRequest, notFound } from '../http-error';
import type { Engine, Models } from '../models';
import type { LatestValue, LiveState, RunState } from '../telemetry/types';
import { engineIdsMatching, type PageRequest } from './list-page';

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
export interface EngineListOptions {
  siteId?: number;
  siteIds?: number[];
  includeRetired?: boolean;
  /** Text in the engine's name or its site's name (case-insensitive). */
  q?: string;
}

async function engineWhere(models: Models, opts: EngineListOptions): Promise<WhereOptions> {
  const where: Record<string | symbol, unknown> = {};
  if (!opts.includeRetired) where.retiredAt = null;
  if (opts.siteIds !== undefined) where.siteId = opts.siteId === undefined ? opts.siteIds : opts.siteIds.filter((id) => id === opts.siteId);
  else if (opts.siteId !== undefined) where.siteId = opts.siteId;
  if (opts.q) where.id = await engineIdsMatching(models, models.Engine.sequelize!, opts.q);
  return where;
}

/** By site, then name, then id: a total order, so pages never repeat or skip an engine. */
const ENGINE_ORDER: [string, string][] = [
  ['siteId', 'ASC'],
  ['name', 'ASC'],
  ['id', 'ASC'],
];

export async function listEngines(models: Models, opts: EngineListOptions = {}): Promise<Engine[]> {
  return models.Engine.findAll({ where: await engineWhere(models, opts), order: ENGINE_ORDER });
}

/** One page of engines and how many match over all pages. */
export async function listEnginesPage(models: Models, opts: EngineListOptions, page: PageRequest): Promise<{ rows: Engine[]; total: number }> {
  const where = await engineWhere(models, opts);
  const [total, rows] = await Promise.all([
    models.Engine.count({ where }),
    models.Engine.findAll({ where, order: ENGINE_ORDER, limit: page.limit, offset: page.offset }),
  ]);
  return { rows, total };
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

/**
 * siteId of an engine (live-push rooms); null when unknown. One query loads every engine's site: asked one by one,
 * 2,000 engines took seconds of queries at a server start while their first readings waited for their rooms
 * (measured under the push bench). The table is loaded again when asked for after `maxAgeMs` (an engine moved to
 * another site is seen within that time), the old answer given meanwhile; an engine not in it is looked up alone.
 */
export function siteOfEngineLookup(models: Models, maxAgeMs = 60_000): (engineId: number) => Promise<number | null> {
  let sites = new Map<number, number>();
  let loadedAt = -Infinity;
  let loading: Promise<void> | null = null;
  const loadAll = (): Promise<void> =>
    (loading ??= (async () => {
      const rows = await models.Engine.findAll({ attributes: ['id', 'siteId'], raw: true });
      sites = new Map(rows.map((r) => [Number(r.id), Number(r.siteId)]));
      loadedAt = Date.now();
    })().finally(() => {
      loading = null;
    }));
  return async (engineId) => {
    const hit = sites.get(engineId);
    if (hit !== undefined) {
      if (Date.now() - loadedAt > maxAgeMs) void loadAll().catch(() => undefined); // the caller has an answer already
      return hit;
    }
    // not known: with the others when the table is not fresh (many engines miss together at a start), else alone
    if (loading || Date.now() - loadedAt > 1000) {
      await loadAll();
      const loaded = sites.get(engineId);
      if (loaded !== undefined) return loaded;
    }
    const engine = await models.Engine.findByPk(engineId, { attributes: ['id', 'siteId'] });
    if (!engine) return null;
    sites.set(engineId, engine.siteId);
    return engine.siteId;
  };
}
