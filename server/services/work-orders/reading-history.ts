import { QueryTypes, type Sequelize } from 'sequelize';
import { CHANNELS, RUNNING_RPM, type ChannelKey } from '../../../shared/channels';
import type { TimedValue } from '../../../shared/work/opening-check';
import type { AcceptedReading } from '../../telemetry/types';
import { readRawRange } from '../history/raw-range';

/** The channels the opening check reads. */
export const GATE_CHANNELS = [
  'coolant_temp',
  'coolant_pressure',
  'engine_speed',
  'ambient_temp',
  'coolant_conductivity',
] as const satisfies readonly ChannelKey[];
export type GateChannel = (typeof GATE_CHANNELS)[number];

export interface HistoryOptions {
  /** How far back to keep, ms (default 3 h: enough for a cool-down fit). */
  keepMs?: number;
  /** Consecutive kept samples at least this far apart, ms; a newer one replaces the newest kept (default 2 s). */
  spacingMs?: number;
}

type Series = Record<GateChannel, TimedValue[]>;

/** What the stored readings say about the engine's last stop. */
export interface StopRecord {
  /** ms of the newest good engine-speed reading above RUNNING_RPM; null when the record shows none. */
  lastRunTs: number | null;
  /** ms of the first good engine-speed reading after lastRunTs (the stop); null when none yet. */
  stoppedSinceTs: number | null;
}

const emptySeries = (): Series => ({ coolant_temp: [], coolant_pressure: [], engine_speed: [], ambient_temp: [], coolant_conductivity: [] });

/**
 * A short, bounded in-memory history per engine of the channels the opening check needs, fed from
 * telemetry.onReadings. At most keepMs / spacingMs samples per channel, so memory stays bounded
 * however fast a device publishes. On first use for an engine the recent past is loaded from the
 * readings table, so a restart (or an engine first asked about late) still has its cool-down curve.
 * Only engines asked about in the last keepMs are followed: a fleet of hundreds would otherwise hold
 * hours of samples for every engine (about 1 MB each) although only engines under work need them.
 * The engine's last stop comes from the stored record too (see stopRecord), however long ago it was,
 * so a restart or a gap in the data never shortens "stopped for".
 */
export class ReadingHistory {
  private readonly engines = new Map<number, Series>();
  private readonly loaded = new Map<number, Promise<void>>();
  private readonly askedAt = new Map<number, number>();
  private readonly stops = new Map<number, StopRecord>();
  private readonly keepMs: number;
  private readonly spacingMs: number;

  constructor(
    private readonly sequelize: Sequelize | null,
    opts: HistoryOptions = {},
  ) {
    this.keepMs = opts.keepMs ?? 3 * 3600 * 1000;
    this.spacingMs = opts.spacingMs ?? 2000;
  }

  /** Listener for telemetry.onReadings. */
  readonly onReadings = (readings: AcceptedReading[]): void => {
    for (const r of readings) {
      // without a database (tests) every engine is followed; with one, only engines asked about lately
      if (this.sequelize && !this.loaded.has(r.engineId)) continue;
      if ((GATE_CHANNELS as readonly string[]).includes(r.channel))
        this.add(r.engineId, r.channel as GateChannel, { ts: r.ts, value: r.value, quality: r.quality });
      if (r.channel === 'engine_speed' && r.quality === 0) this.noteSpeed(r.engineId, r.ts, r.value);
    }
  };

  /** Keeps the stop record of a followed engine current as readings arrive (a late backlog included). */
  private noteSpeed(engineId: number, ts: number, rpm: number): void {
    const rec = this.stops.get(engineId);
    if (rec) this.noteSpeedInto(rec, ts, rpm);
  }

  /** The engine's last stop as the stored readings show it (null without a database). */
  async stopRecord(engineId: number, now = Date.now()): Promise<StopRecord | null> {
    await this.series(engineId, now);
    return this.stops.get(engineId) ?? null;
  }

  add(engineId: number, channel: GateChannel, v: TimedValue): void {
    let s = this.engines.get(engineId);
    if (!s) {
      s = emptySeries();
      this.engines.set(engineId, s);
    }
    const list = s[channel];
    const last = list[list.length - 1];
    if (!last || v.ts > last.ts) {
      const prev = list[list.length - 2];
      if (last && prev && last.ts - prev.ts < this.spacingMs) list[list.length - 1] = v;
      else list.push(v);
    } else if (v.ts < last.ts) {
      // a late sample (a gateway's offline backlog): insert in order, skip exact duplicates
      const i = list.findIndex((x) => x.ts >= v.ts);
      if (list[i].ts !== v.ts) list.splice(i, 0, v);
    } else {
      list[list.length - 1] = v;
    }
    const cutoff = v.ts - this.keepMs;
    let drop = 0;
    while (drop < list.length && list[drop].ts < cutoff) drop++;
    if (drop) list.splice(0, drop);
    const cap = Math.ceil(this.keepMs / this.spacingMs) + 16;
    if (list.length > cap) list.splice(0, list.length - cap);
  }

  /** The engine's history, once its recent past has been loaded from the database. */
  async series(engineId: number, now = Date.now()): Promise<Readonly<Series>> {
    this.forgetIdle(now);
    this.askedAt.set(engineId, now);
    await this.ensureLoaded(engineId, now);
    const s = this.engines.get(engineId) ?? emptySeries();
    return s;
  }

  /** Stop following engines nobody asked about for keepMs; asked again, they load from the database. */
  private forgetIdle(now: number): void {
    if (!this.sequelize) return;
    for (const [engineId, at] of this.askedAt) {
      if (now - at <= this.keepMs) continue;
      this.askedAt.delete(engineId);
      this.loaded.delete(engineId);
      this.engines.delete(engineId);
      this.stops.delete(engineId);
    }
  }

  private ensureLoaded(engineId: number, now: number): Promise<void> {
    if (!this.sequelize) return Promise.resolve();
    let p = this.loaded.get(engineId);
    if (!p) {
      p = this.load(engineId, now).catch((err) => {
        this.loaded.delete(engineId);
        throw err;
      });
      this.loaded.set(engineId, p);
    }
    return p;
  }

  /** One query: per channel and per spacing window, the last good reading (portable SQL). */
  private async load(engineId: number, now: number): Promise<void> {
    const codes = GATE_CHANNELS.map((k) => CHANNELS[k].code);
    // timestamps are milliseconds: 64-bit on both databases (PostgreSQL's INTEGER is 32-bit)
    const int = this.sequelize!.getDialect() === 'postgres' ? 'BIGINT' : 'INTEGER';
    const rows = await this.sequelize!.query<{ channel: number; ts: number; value: number }>(
      `SELECT channel, MAX(ts) AS ts, AVG(value) AS value FROM readings
        WHERE engine_id = ? AND channel IN (${codes.map(() => '?').join(',')}) AND quality = 0 AND ts >= CAST(? AS ${int})
        GROUP BY channel, CAST(ts / ? AS ${int}) ORDER BY ts`,
      { replacements: [engineId, ...codes, now - this.keepMs, this.spacingMs], type: QueryTypes.SELECT, logging: false },
    );
    const byCode = new Map(GATE_CHANNELS.map((k) => [CHANNELS[k].code, k]));
    for (const r of rows) {
      const key = byCode.get(Number(r.channel));
      if (key) this.add(engineId, key, { ts: Number(r.ts), value: Number(r.value), quality: 0 });
    }
    this.stops.set(engineId, await this.loadStop(engineId));
  }

  /**
   * The last running reading and the first reading after it, from the stored record however old: the
   * per-minute rollups find the minute (a few thousand rows a month, not every reading), the raw readings
   * of that minute the exact time. Without rollups for the engine the raw readings are searched instead.
   */
  private async loadStop(engineId: number): Promise<StopRecord> {
    const code = CHANNELS.engine_speed.code;
    const q = async <T extends object>(sql: string, replacements: unknown[]) =>
      (await this.sequelize!.query<T>(sql, { replacements, type: QueryTypes.SELECT, logging: false }))[0];
    const rolled = await q<{ minute: number | null; n: number }>(
      'SELECT MAX(CASE WHEN "max" > ? THEN minute END) AS minute, COUNT(*) AS n FROM rollups WHERE engine_id = ? AND channel = ?',
      [RUNNING_RPM, engineId, code],
    );
    let lastRunTs: number | null = null;
    if (Number(rolled?.n ?? 0) > 0) {
      if (rolled.minute !== null) {
        // that minute's readings, raw or compacted (server/services/history)
        const minute = Number(rolled.minute);
        const inMinute = await readRawRange(this.sequelize!, engineId, code, minute, minute + 60_000, { goodOnly: true });
        for (const r of inMinute) if (r.value > RUNNING_RPM) lastRunTs = r.ts;
      }
    } else {
      const row = await q<{ ts: number | null }>('SELECT MAX(ts) AS ts FROM readings WHERE engine_id = ? AND channel = ? AND quality = 0 AND value > ?', [
        engineId,
        code,
        RUNNING_RPM,
      ]);
      lastRunTs = row?.ts === null || row?.ts === undefined ? null : Number(row.ts);
    }
    // the first good reading after it, raw or compacted: a stop older than COMPACT_AFTER_H began in compacted history
    const [first] = await readRawRange(this.sequelize!, engineId, code, (lastRunTs ?? -1) + 1, Number.MAX_SAFE_INTEGER, { goodOnly: true, limit: 1 });
    const rec: StopRecord = { lastRunTs, stoppedSinceTs: first ? first.ts : null };
    // readings that arrived while this was loading
    for (const v of this.engines.get(engineId)?.engine_speed ?? []) if ((v.quality ?? 0) === 0) this.noteSpeedInto(rec, v.ts, v.value);
    return rec;
  }

  private noteSpeedInto(rec: StopRecord, ts: number, rpm: number): void {
    if (rpm > RUNNING_RPM) {
      if (rec.lastRunTs === null || ts > rec.lastRunTs) {
        rec.lastRunTs = ts;
        if (rec.stoppedSinceTs !== null && rec.stoppedSinceTs <= ts) rec.stoppedSinceTs = null;
      }
    } else if ((rec.lastRunTs === null || ts > rec.lastRunTs) && (rec.stoppedSinceTs === null || ts < rec.stoppedSinceTs)) {
      rec.stoppedSinceTs = ts;
    }
  }
}

/**
 * The server's one opening-check history: startServer creates it and feeds it from telemetry.onReadings;
 * an app built without telemetry (tests) gets one that reads the stored record only.
 */
export function openingHistoryOf(ctx: { sequelize: Sequelize; openingHistory?: ReadingHistory }): ReadingHistory {
  return (ctx.openingHistory ??= new ReadingHistory(ctx.sequelize));
}
