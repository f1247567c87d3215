/**
 * socket.io live push: JWT at the handshake, rooms per fleet/site/engine, and per-engine
 * coalescing of readings with a leading-edge throttle (first message at once, then at most one
 * per window with the latest values, and a trailing flush).
 */
import type http from 'node:http';
import { Server, type ServerOptions, type Socket } from 'socket.io';
import { z } from 'zod';
import type { ChannelKey } from '../../shared/channels';
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
  throttleMs?: number;
  /** Behind a trusted proxy (TRUST_PROXY) the browser's host is in X-Forwarded-Host when the proxy sets it. */
  trustForwardedHost?: boolean;
  /** Several servers: the socket.io adapter that passes events between them (server/cluster). */
  adapter?: ServerOptions['adapter'];
}

export interface ReadingsMessage {
  engineId: number;
  siteId: number | null;
  ts: number;
  values: Partial<Record<ChannelKey, LatestValue>>;
}

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

/** Every socket of one user, so their sessions can be ended together. */
const userRoom = (userId: number) => `user:${userId}`;

/** Between servers (socket.io serverSideEmit): a user's sites changed. */
const RESCOPE_EVENT = 'jw:rescope';
/** Between servers: a user's sessions ended; each server tells and closes its own sockets of theirs. */
const END_SESSIONS_EVENT = 'jw:end-sessions';

export class LivePush {
  readonly io: Server;
  private readonly throttleMs: number;
  private readonly pending = new Map<number, Pending>();
  private readonly sites = new Map<number, { siteId: number | null; until: number }>();

  constructor(private readonly opts: LivePushOptions) {
    this.throttleMs = opts.throttleMs ?? 250;
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

  /** Takes every accepted batch; sends per engine, throttled. O(readings): only the engines in the batch are looked at. */
  push(readings: AcceptedReading[]): void {
    let last: Pending | null = null;
    let lastEngine = -1;
    for (let i = 0; i < readings.length; i++) {
      const r = readings[i];
      let p: Pending | undefined = r.engineId === lastEngine && last ? last : this.pending.get(r.engineId);
      if (!p) {
        p = { values: {}, timer: null, dirty: false };
        this.pending.set(r.engineId, p);
      }
      const prev = p.values[r.channel];
      if (!prev || r.ts >= prev.ts) {
        p.values[r.channel] = { value: r.value, ts: r.ts, quality: r.quality };
        p.dirty = true;
      }
      // a batch is nearly always one engine's: send on its last reading, or when the engine changes
      const next = readings[i + 1];
      if ((!next || next.engineId !== r.engineId) && p.dirty && !p.timer) this.send(r.engineId, p); // leading edge
      last = p;
      lastEngine = r.engineId;
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
    const cached = this.sites.get(engineId);
    if (cached && cached.until > Date.now()) {
      this.deliver({ engineId, siteId: cached.siteId, ts, values });
    } else {
      this.opts.siteOfEngine(engineId).then(
        (siteId) => {
          this.sites.set(engineId, { siteId, until: Date.now() + SITE_CACHE_MS });
          this.deliver({ engineId, siteId, ts, values });
        },
        (err) => {
          this.opts.log.warn('live push: site lookup failed', err instanceof Error ? err.message : err);
          this.deliver({ engineId, siteId: null, ts, values });
        },
      );
    }
  }

  private deliver(msg: ReadingsMessage): void {
    const rooms = ['fleet', `engine:${msg.engineId}`];
    if (msg.siteId !== null) rooms.push(`site:${msg.siteId}`);
    // a socket in several of these rooms still gets the message once. Only this server's sockets: with several
    // servers every server gets every reading (relayed, server/cluster) and pushes it to its own browsers
    this.io.local.to(rooms).emit('readings', msg);
  }

  async close(): Promise<void> {
    for (const p of this.pending.values()) if (p.timer) clearTimeout(p.timer);
    this.pending.clear();
    // close sockets but not the HTTP server, which belongs to the caller
    this.io.local.disconnectSockets(true);
    this.io.engine?.close();
    if (this.opts.adapter) await this.io.of('/').adapter.close();
  }
}
