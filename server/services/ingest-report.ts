import type { AppContext } from '../app-context';

/** Full ingest counters plus the persisted per-device reject counts. */
export async function ingestReport(ctx: AppContext) {
  const { Device, DeviceRejection } = ctx.models;
  const rows = await DeviceRejection.findAll({
    include: [{ model: Device, as: 'device', attributes: ['id', 'username', 'engineId'] }],
    order: [
      ['deviceId', 'ASC'],
      ['reason', 'ASC'],
    ],
  });
  return {
    counters: ctx.telemetry?.counters() ?? null,
    rejections: rows.map((r) => {
      const d = (r as unknown as { device?: { username: string; engineId: number } }).device;
      return {
        deviceId: r.deviceId,
        username: d?.username ?? null,
        engineId: d?.engineId ?? null,
        reason: r.reason,
        count: r.count,
        lastAt: r.lastAt,
        lastDetail: r.lastDetail,
      };
    }),
  };
}
