import { Op, UniqueConstraintError } from 'sequelize';
import type { Models } from '../models';

/** How long a key is remembered: longer than a technician stays out of network (common practice: a week). */
export const IDEMPOTENCY_KEEP_MS = 7 * 24 * 3600 * 1000;

export type IdempotencyStart = { kind: 'new' } | { kind: 'replay'; statusCode: number; body: unknown } | { kind: 'busy' } | { kind: 'mismatch' };

/**
 * Idempotency keys of write requests: the first request with a key is handled and its answer kept;
 * the same key again (a retry after a lost answer) gets that answer back and changes nothing.
 * Keys are per user, so one user's key never answers for another.
 */
export class IdempotencyService {
  private lastSweep = 0;

  constructor(private readonly models: Models) {}

  async start(userId: number, key: string, method: string, path: string, now = new Date()): Promise<IdempotencyStart> {
    await this.sweep(now);
    try {
      await this.models.IdempotencyKey.create({ userId, key, method, path, statusCode: null, body: null, createdAt: now });
      return { kind: 'new' };
    } catch (err) {
      if (!(err instanceof UniqueConstraintError)) throw err;
    }
    const row = await this.models.IdempotencyKey.findOne({ where: { userId, key } });
    if (!row) return this.start(userId, key, method, path, now); // forgotten in between: handle it now
    if (row.method !== method || row.path !== path) return { kind: 'mismatch' };
    if (row.statusCode === null) return { kind: 'busy' };
    return { kind: 'replay', statusCode: row.statusCode, body: row.body === null ? null : JSON.parse(row.body) };
  }

  async finish(userId: number, key: string, statusCode: number, body: unknown): Promise<void> {
    await this.models.IdempotencyKey.update({ statusCode, body: body === undefined ? null : JSON.stringify(body) }, { where: { userId, key } });
  }

  /** The request ended without an answer worth keeping (a server fault, a refused session): a retry is handled afresh. */
  async forget(userId: number, key: string): Promise<void> {
    await this.models.IdempotencyKey.destroy({ where: { userId, key } });
  }

  private async sweep(now: Date): Promise<void> {
    if (now.getTime() - this.lastSweep < 3600_000) return;
    this.lastSweep = now.getTime();
    await this.models.IdempotencyKey.destroy({ where: { createdAt: { [Op.lt]: new Date(now.getTime() - IDEMPOTENCY_KEEP_MS) } } });
  }
}
