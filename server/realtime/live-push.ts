/**
 * socket.io live push: JWT at the handshake, rooms per fleet/site/engine, and coalesced readings.
 * - Fleet and site watchers get one `readings-batch` per interval (fleetIntervalMs, 50 ms) with every engine of their
 *   scope that changed in it (its latest value per channel): a fleet board at 2,000 engines gets 20 messages a
 *   second, not 2,000. The interval has a leading edge (a quiet fleet's first reading goes at once). A reading waits
 *   at most one interval, so the interval bounds what coalescing adds to publish -> browser (it was 250 ms, which
 *   alone kept the p95 over 100 ms). Each batch is built once and encoded once per room (socket.io broadcasts
 *   encode once for all the room's sockets), with only the engines that changed, so a shorter interval costs
 *   little more than a longer one: the same engines, in more and smaller messages.
 * - Engine pages get `readings` per engine with a leading-edge throttle (throttleMs, 250 ms: first message at once,
 *   then at most one per window with the latest values, and a trailing flush), except sockets that get the engine
 *   in a batch.
 * - Values are pushed once accepted, in arrival order, before their commit (the MQTT acknowledgement waits for the
 *   commit; the screen need not). A value on screen is not then lost while the server runs: a failed write keeps its
 *   rows and retries them (server/telemetry/reading-writer.ts) with an error logged, the backlog shows as `buffered` in
 *   the ingest figures (/api/health, the admin's ingest page), and the device's message stays unacknowledged until
 *   its rows are stored. If the server dies before the commit, a QoS 1
 *   device sends the message again after the restart (QoS 0 never promised storage).
 * Work per interval is O(changed engines + feeds); memory is bounded by the engines and the sockets' scopes.
 */
import type http from 'node:http';
import { Server, type ServerOptions, type Socket } from 'socket.io';
import { z } from 'zod';
import type { ChannelKey } from '../../shared/channels';
import { READINGS_BATCH_EVENT, READINGS_EVENT, type LiveReadings, type LiveReadingsBatch } from '../../shared/api/live-view';
import type { Logger } from '../logger';
import type { AcceptedReading, AuthUser, LatestValue } from '../telemetry/types';
import { crossSiteRefusal, sessionCookieToken } from '../auth/session-cookie';

export interface LivePushOptions {
  httpServer: http.Server;
  verifyToken(token: string): AuthUser | null;
  siteOfEngine(engineId: number): Promise<number | null>;
  /** Sites the user may see (server/services/site-access.ts); absent: every site. */
  siteScope?(user: AuthUser): Promise<{ all: boolean; siteIds: readonly number[] }>;
  /** Whether the token's session still holds (user enabled, session version current); absent: yes. */
  sessionValid?(user: AuthUser): Promise<boolean>;
  log: Logger;
  /** Engine pages: at most one message per engine per this window (ms, default 250). */
  throttleMs?: number;
  /** Fleet and site watchers: one batch per this interval (ms, default 50). */
  fleetIntervalMs?: number;
  /** Behind a trusted proxy (TRUST_PROXY) the browser's host is in X-Forwarded-Host when the proxy sets it. */
  trustForwardedHost?: boolean;
  /** Several servers: the socket.io adapter that passes events between them (server/cluster). */
  adapter?: ServerOptions['adapter'];
}

/** One engine's live message (shared/api/live-view.ts). */
export type ReadingsMessage = LiveReadings;

const watchSchema = z.object({
  fleet: z.boolean().optional(),
  /** Alarm events of the whole fleet, without the fleet's readings. */
  alarms: z.boolean().optional(),
  siteIds: z.array(z.number().int().positive()).max(1000).optional(),
  engineIds: z.array(z.number().int().positive()).max(5000).optional(),
});

interface Pending {
  values: Partial<Record<ChannelKey, LatestValue>>;
  timer: NodeJS.Timeout | null;
  dirty: boolean;
}

const SITE_CACHE_MS = 60_000;

/** Room of `alarm` events: every alarm change of the fleet, and nothing else. */
export const ALARMS_ROOM = 'alarms';
/** Alarm events of one site, for users limited to some sites (they never join ALARMS_ROOM). */
export const alarmsSiteRoom = (siteId: number) => `alarms:site:${siteId}`;

/**
 * Room of the sockets watching the same sites without the whole fleet: one batch per interval goes to each such room,
 * so a socket in several site rooms still gets one message. Internal: not in a watch's reply.
 */
const feedRoom = (siteIds: readonly number[]) => `feed:${[...siteIds].sort((a, b) => a - b).join(',')}`;

/** Every socket of one user, so their sessions can be ended together. */
const userRoom = (userId: number) => `user:${userId}`;

/** Between servers (socket.io serverSideEmit): a user's sites changed. */
const RESCOPE_EVENT = 'jw:rescope';
/** Between servers: a user's sessions ended; each server tells and closes its own sockets of theirs. */
const END_SESSIONS_EVENT = 'jw:end-sessions';

export class LivePush {
  readonly io: Server;
  private readonly throttleMs: number;
  private readonly fleetIntervalMs: number;
  /** Engine pages: per-engine throttle, only for engines a socket of this server watches. */
  private readonly pending = new Map<number, Pending>();
  private readonly sites = new Map<number, { siteId: number | null; until: number }>();
  /** Site lookups in flight, per engine. */
  private readonly lookups = new Map<number, Promise<number | null>>();
  /** Fleet and site watchers: engines changed in this interval, their latest value per channel. */
  private changed = new Map<number, Partial<Record<ChannelKey, LatestValue>>>();
  /** The interval's timer; null while no interval is open (then the next reading is sent at once). */
  private tick: NodeJS.Timeout | null = null;
  /** Feed rooms (site watchers without the fleet) with their sites; a room gone from the adapter is dropped at the next flush. */
  private readonly feeds = new Map<string, readonly number[]>();

  constructor(private readonly opts: LivePushOptions) {
    this.throttleMs = opts.throttleMs ?? 250;
    this.fleetIntervalMs = opts.fleetIntervalMs ?? 50;
    this.io = new Server(opts.httpServer, { serveClient: false, cors: { origin: false }, ...(opts.adapter ? { adapter: opts.adapter } : {}) });
    // several servers: a user's sites changed on another server re-scope this server's sockets of theirs too
    if (opts.adapter) {
      this.io.on(RESCOPE_EVENT, (userId: unknown) => typeof userId === 'number' && void this.rescopeHere(userId));
      this.io.on(END_SESSIONS_EVENT, (userId: unknown) => typeof userId === 'number' && this.endSessionsHere(userId));
    }
    this.io.use((socket, next) => {
      try {
        const token = this.handshakeToken(socket);
        const user = token ? opts.verifyToken(token) : null;
        if (!user) return next(new Error('unauthorized'));
        const valid = opts.sessionValid ? opts.sessionValid(user) : Promise.resolve(true);
        valid.then(
          (ok) => {
            if (!ok) return next(new Error('unauthorized'));
            socket.data.user = user;
            next();
          },
          () => next(new Error('unauthorized')),
        );
      } catch {
        next(new Error('unauthorized'));
      }
    });
    this.io.on('connection', (socket) => this.onConnection(socket));
  }

  /**
   * An API client's token (`auth: { token }`), else the browser's session cookie: the same session as
   * HTTP. A handshake with the cookie from a page of another site is refused (Sec-Fetch-Site / Origin).
   */
  private handshakeToken(socket: Socket): string | null {
    const explicit = socket.handshake.auth?.token;
    if (typeof explicit === 'string' && explicit) return explicit;
    const headers = socket.handshake.headers;
    const fromCookie = sessionCookieToken(headers.cookie);
    if (!fromCookie) return null;
    const forwarded = this.opts.trustForwardedHost ? headers['x-forwarded-host'] : undefined;
    const host = (typeof forwarded === 'string' && forwarded ? forwarded.split(',')[0].trim() : undefined) ?? headers.host;
    const refusal = crossSiteRefusal('GET', headers, host, { needHeader: false });
    if (refusal) {
      this.opts.log.warn(`live push: handshake refused: ${refusal}`);
      return null;
    }
    return fromCookie;
  }

  private onConnection(socket: Socket): void {
    void socket.join(userRoom((socket.data.user as AuthUser).id));
    socket.on('watch', (raw: unknown, ack?: unknown) => {
      const parsed = watchSchema.safeParse(raw);
      const reply = typeof ack === 'function' ? (ack as (x: unknown) => void) : () => undefined;
      if (!parsed.success) return reply({ error: 'watch takes { fleet?, alarms?, siteIds?, engineIds? }' });
      socket.data.watch = parsed.data;
      this.applyWatch(socket, parsed.data).then(
        (rooms) => {
          if (rooms) reply({ rooms });
        },
        (err) => {
          this.opts.log.warn('live push: watch failed', err instanceof Error ? err.message : err);
          reply({ error: 'watch failed' });
        },
      );
    });
  }

  /** Joins the rooms of a watch under the user's current sites; null when a later watch won meanwhile. */
  private async applyWatch(socket: Socket, w: z.infer<typeof watchSchema>): Promise<string[] | null> {
    const seq = (socket.data.watchSeq = ((socket.data.watchSeq as number | undefined) ?? 0) + 1);
    const rooms = await this.allowedRooms(socket.data.user as AuthUser, w);
    if (seq !== socket.data.watchSeq) return null; // a later watch won
    // a new watch replaces the previous one
    for (const room of socket.rooms) if (room !== socket.id && !room.startsWith('user:')) void socket.leave(room);
    void socket.join(rooms);
    // sites without the fleet: the batches come through the feed room of exactly these sites
    const siteIds = rooms.includes('fleet') ? [] : rooms.filter((r) => r.startsWith('site:')).map((r) => Number(r.slice(5)));
    if (siteIds.length) {
      const feed = feedRoom(siteIds);
      this.feeds.set(feed, siteIds);
      void socket.join(feed);
    }
    return rooms;
  }

  /** The user's sites changed: every open socket of theirs, on every server, keeps its watch under the new sites. */
  async rescope(userId: number): Promise<void> {
    if (this.opts.adapter) this.io.serverSideEmit(RESCOPE_EVENT, userId);
    await this.rescopeHere(userId);
  }

  private async rescopeHere(userId: number): Promise<void> {
    for (const socket of await this.io.local.in(userRoom(userId)).fetchSockets()) {
      const local = this.io.sockets.sockets.get(socket.id);
      if (!local) continue;
      const w = local.data.watch as z.infer<typeof watchSchema> | undefined;
      if (!w) continue;
      const rooms = await this.applyWatch(local, w).catch((err) => {
        this.opts.log.warn('live push: re-scope failed', err instanceof Error ? err.message : err);
        return null;
      });
      if (rooms) local.emit('rooms', { rooms }); // what the socket now receives, as a watch reply would say
    }
  }

  /** Rooms of a watch, limited to the user's sites: fleet becomes their sites, other sites and engines are left out. */
  private async allowedRooms(user: AuthUser, w: z.infer<typeof watchSchema>): Promise<string[]> {
    const scope = this.opts.siteScope ? await this.opts.siteScope(user) : { all: true, siteIds: [] };
    const rooms: string[] = [];
    if (scope.all) {
      if (w.fleet) rooms.push('fleet');
      if (w.alarms) rooms.push(ALARMS_ROOM);
      for (const id of w.siteIds ?? []) rooms.push(`site:${id}`);
      for (const id of w.engineIds ?? []) rooms.push(`engine:${id}`);
      return rooms;
    }
    const mine = new Set(scope.siteIds);
    if (w.fleet) for (const id of mine) rooms.push(`site:${id}`);
    if (w.alarms) for (const id of mine) rooms.push(alarmsSiteRoom(id));
    for (const id of w.siteIds ?? []) if (mine.has(id) && !w.fleet) rooms.push(`site:${id}`);
    for (const id of w.engineIds ?? []) {
      const siteId = await this.opts.siteOfEngine(id);
      if (siteId !== null && mine.has(siteId)) rooms.push(`engine:${id}`);
    }
    return rooms;
  }

  /** The user's sessions ended (disabled, role, sites or password changed): close their sockets now. */
  endSessions(userId: number): void {
    // each server ends its own sockets: through the adapter, an emit and a disconnect are two messages that
    // may arrive in either order, and the reason must reach the page before the socket closes
    if (this.opts.adapter) this.io.serverSideEmit(END_SESSIONS_EVENT, userId);
    this.endSessionsHere(userId);
  }

  private endSessionsHere(userId: number): void {
    const here = this.io.local.in(userRoom(userId));
    here.emit('session-ended', { reason: 'Your account or its access was changed by an administrator.' });
    here.disconnectSockets(true);
  }

  /**
   * To a room, or to several at once (a socket in more than one of them gets the event once), on every
   * server (through the adapter when there are several).
   */
  emit(room: string | string[], event: string, payload: unknown): void {
    this.io.to(room).emit(event, payload);
  }

  /**
   * Takes every accepted batch. O(readings): only the engines in the batch are looked at. Fleet and site watchers:
   * into this interval's changes (sent at once when no interval is open). Engine pages: per engine, throttled,
   * only for engines a socket of this server watches.
   */
  push(readings: AcceptedReading[]): void {
    const localRooms = this.io.of('/').adapter.rooms;
    let i = 0;
    while (i < readings.length) {
      // a batch is nearly always one engine's: one run of readings of the same engine at a time
      const engineId = readings[i].engineId;
      let values = this.changed.get(engineId);
      if (!values) {
        values = {};
        this.changed.set(engineId, values);
      }
      let p = this.pending.get(engineId);
      if (!p && localRooms.has(`engine:${engineId}`)) {
        p = { values: {}, timer: null, dirty: false };
        this.pending.set(engineId, p);
      }
      for (; i < readings.length && readings[i].engineId === engineId; i++) {
        const r = readings[i];
        const v: LatestValue = { value: r.value, ts: r.ts, quality: r.quality };
        const prev = values[r.channel];
        if (!prev || r.ts >= prev.ts) values[r.channel] = v;
        if (p) {
          const prevP = p.values[r.channel];
          if (!prevP || r.ts >= prevP.ts) {
            p.values[r.channel] = v;
            p.dirty = true;
          }
        }
      }
      if (p && p.dirty && !p.timer) this.send(engineId, p); // leading edge
    }
    if (!this.tick) this.flush(); // leading edge of the fleet interval
  }

  /** The site of an engine: cached (a stale entry is used while it is looked up again); undefined while unknown. */
  private siteOf(engineId: number, now: number): number | null | undefined {
    const cached = this.sites.get(engineId);
    if (cached && cached.until > now) return cached.siteId;
    void this.lookUpSite(engineId);
    return cached?.siteId;
  }

  /** One lookup at a time per engine; a failed one counts as no site (the engine then goes to the fleet only). */
  private lookUpSite(engineId: number): Promise<number | null> {
    let lookup = this.lookups.get(engineId);
    if (!lookup) {
      lookup = this.opts
        .siteOfEngine(engineId)
        .catch((err: unknown) => {
          this.opts.log.warn('live push: site lookup failed', err instanceof Error ? err.message : err);
          return null;
        })
        .then((siteId) => {
          this.lookups.delete(engineId);
          this.sites.set(engineId, { siteId, until: Date.now() + SITE_CACHE_MS });
          if (!this.tick && this.changed.has(engineId)) this.flush(); // it waited for its site
          return siteId;
        });
      this.lookups.set(engineId, lookup);
    }
    return lookup;
  }

  /**
   * End of an interval: one `readings-batch` to the fleet room and one to each feed room with changes, then the next
   * interval opens. Engines whose site is not known yet wait for the next one. O(changed engines + feeds).
   */
  private flush(): void {
    this.tick = null;
    if (this.changed.size === 0) return; // quiet: the interval closes, the next reading goes at once
    const localRooms = this.io.of('/').adapter.rooms;
    if (!localRooms.has('fleet') && this.feeds.size === 0) {
      this.changed.clear(); // nobody here watches the fleet or a site (a new board loads its list over HTTP)
      return;
    }
    const now = Date.now();
    const changed = this.changed;
    this.changed = new Map();
    const all: ReadingsMessage[] = [];
    const bySite = new Map<number, ReadingsMessage[]>();
    for (const [engineId, values] of changed) {
      const siteId = this.siteOf(engineId, now);
      if (siteId === undefined) {
        this.changed.set(engineId, values); // newer values of this interval were written to a new entry: none yet
        continue;
      }
      let ts = 0;
      for (const v of Object.values(values)) if (v && v.ts > ts) ts = v.ts;
      const msg: ReadingsMessage = { engineId, siteId, ts, values };
      all.push(msg);
      if (siteId !== null) {
        const list = bySite.get(siteId);
        if (list) list.push(msg);
        else bySite.set(siteId, [msg]);
      }
    }
    this.tick = setTimeout(() => this.flush(), this.fleetIntervalMs);
    if (!all.length) return;
    // only this server's sockets: with several servers every server gets every reading (relayed, server/cluster)
    // and pushes it to its own browsers
    if (localRooms.has('fleet')) this.io.local.to('fleet').emit(READINGS_BATCH_EVENT, { engines: all } satisfies LiveReadingsBatch);
    for (const [room, siteIds] of this.feeds) {
      if (!localRooms.has(room)) {
        this.feeds.delete(room); // its last socket left
        continue;
      }
      const engines: ReadingsMessage[] = [];
      for (const siteId of siteIds) for (const msg of bySite.get(siteId) ?? []) engines.push(msg);
      if (engines.length) this.io.local.to(room).emit(READINGS_BATCH_EVENT, { engines } satisfies LiveReadingsBatch);
    }
  }

  private send(engineId: number, p: Pending): void {
    const values = p.values;
    p.values = {};
    p.dirty = false;
    p.timer = setTimeout(() => {
      p.timer = null;
      if (p.dirty)
        this.send(engineId, p); // trailing flush, re-arms the window
      else this.pending.delete(engineId);
    }, this.throttleMs);
    let ts = 0;
    for (const v of Object.values(values)) if (v && v.ts > ts) ts = v.ts;
    const siteId = this.siteOf(engineId, Date.now());
    if (siteId !== undefined) {
      this.deliver({ engineId, siteId, ts, values });
      return;
    }
    void this.lookUpSite(engineId).then((site) => this.deliver({ engineId, siteId: site, ts, values }));
  }

  /**
   * To the engine's pages. A socket that also watches the fleet or the engine's site gets the engine in its batches
   * instead, so each socket gets each engine's values once per interval.
   */
  private deliver(msg: ReadingsMessage): void {
    const batched = msg.siteId !== null ? ['fleet', `site:${msg.siteId}`] : ['fleet'];
    this.io.local.to(`engine:${msg.engineId}`).except(batched).emit(READINGS_EVENT, msg);
  }

  async close(): Promise<void> {
    for (const p of this.pending.values()) if (p.timer) clearTimeout(p.timer);
    this.pending.clear();
    if (this.tick) clearTimeout(this.tick);
    this.tick = null;
    this.changed.clear();
    this.feeds.clear();
    // close sockets but not the HTTP server, which belongs to the caller
    this.io.local.disconnectSockets(true);
    this.io.engine?.close();
    if (this.opts.adapter) await this.io.of('/').adapter.close();
  }
}
