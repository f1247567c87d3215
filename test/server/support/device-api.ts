/** The API and database look-ups the Sparkplug gateway tests share: an admin call, an engine's readings, a device's rejections. */
import type { ApiAnswer } from './api-answer';
import type { Db } from './telemetry-server';

/** One JSON call to the API with a bearer token; the status and the parsed answer. */
export async function apiCall(baseUrl: string, token: string, method: string, path: string, body?: unknown): Promise<{ status: number; body: ApiAnswer }> {
  const res = await fetch(baseUrl + path, {
    method,
    headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  return { status: res.status, body: (await res.json()) as ApiAnswer };
}

/** Stored readings of one engine, oldest first. */
export const storedReadings = (db: Db, engineId: number) =>
  db.all<{ channel: number; ts: number; value: number; quality: number }>(
    'SELECT channel, ts, value, quality FROM readings WHERE engine_id = ? ORDER BY ts, channel',
    [engineId],
  );

/** A device's rejection counts by reason (device_rejections). */
export const rejectionCounts = async (db: Db, deviceId: number): Promise<Record<string, number>> =>
  Object.fromEntries(
    (await db.all<{ reason: string; count: number }>('SELECT reason, count FROM device_rejections WHERE device_id = ?', [deviceId])).map((r) => [
      r.reason,
      Number(r.count),
    ]),
  );
