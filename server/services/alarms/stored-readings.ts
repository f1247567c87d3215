import { QueryTypes, type Sequelize } from 'sequelize';
import { channelByCode } from '../../../shared/channels';
import type { AcceptedReading } from '../../telemetry/types';

/** Stored readings of some engines since `sinceTs` (ms), by engine and time: the history a new lease holder replays. */
export async function storedReadings(sequelize: Sequelize, engineIds: number[], sinceTs: number): Promise<AcceptedReading[]> {
  if (!engineIds.length) return [];
  const rows = await sequelize.query<{
    engine_id: number | string;
    channel: number | string;
    ts: number | string;
    value: number | string;
    quality: number | string;
  }>('SELECT engine_id, channel, ts, value, quality FROM readings WHERE engine_id IN (:ids) AND ts >= :since ORDER BY engine_id, ts, channel', {
    replacements: { ids: engineIds, since: Math.floor(sinceTs) },
    type: QueryTypes.SELECT,
    logging: false,
  });
  const out: AcceptedReading[] = [];
  for (const r of rows) {
    const ch = channelByCode(Number(r.channel));
    if (!ch) continue;
    out.push({ engineId: Number(r.engine_id), channel: ch.key, ts: Number(r.ts), value: Number(r.value), quality: Number(r.quality) === 1 ? 1 : 0 });
  }
  return out;
}
