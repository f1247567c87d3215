/**
 * Tiny HTTP control endpoint on 127.0.0.1 so tests and demos can steer engines at run time:
 *   GET  /engines                      state of every engine
 *   GET  /stats                        publish counters
 *   POST /engines/:id/start            run now (until stopped)
 *   POST /engines/:id/stop             stop now (until started)
 *   POST /engines/:id/auto             back to the engine's own schedule
 *   POST /engines/:id/scenario         body { "name": "overheat", "inSeconds"?: 0 }
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { Gateway } from './gateway';
import { SCENARIO_NAMES, isScenarioName } from './scenarios';

const MAX_BODY = 4096;

function reply(res: http.ServerResponse, status: number, body: unknown): void {
  const text = JSON.stringify(body);
  res.writeHead(status, { 'content-type': 'application/json', 'content-length': Buffer.byteLength(text) });
  res.end(text);
}

function readJson(req: http.IncomingMessage): Promise<unknown> {
  return new Promise((resolve, reject) => {
    let size = 0;
    const chunks: Buffer[] = [];
    req.on('data', (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY) {
        reject(new Error('body too large'));
        req.destroy();
      } else chunks.push(c);
    });
    req.on('end', () => {
      const text = Buffer.concat(chunks).toString('utf8').trim();
      if (!text) return resolve({});
      try {
        resolve(JSON.parse(text));
      } catch {
        reject(new Error('body is not JSON'));
      }
    });
    req.on('error', reject);
  });
}

function engineState(gw: Gateway): unknown[] {
  return gw.links.map((l) => ({
    ...l.model.snapshot(),
    connected: l.connected,
    live: l.live,
    buffered: l.buffered,
    ...l.stats,
  }));
}

export function startControlServer(gw: Gateway, port: number): Promise<http.Server> {
  const server = http.createServer((req, res) => {
    void handle(req, res).catch((err: Error) => reply(res, 400, { error: err.message }));
  });

  async function handle(req: http.IncomingMessage, res: http.ServerResponse): Promise<void> {
    const path = (req.url ?? '/').split('?')[0];
    if (req.method === 'GET' && path === '/engines') return reply(res, 200, engineState(gw));
    if (req.method === 'GET' && path === '/stats') return reply(res, 200, gw.totals());
    const m = /^\/engines\/(\d+)\/(start|stop|auto|scenario)$/.exec(path);
    if (!m) return reply(res, 404, { error: `no route ${req.method} ${path}` });
    if (req.method !== 'POST') return reply(res, 405, { error: 'use POST' });
    const link = gw.link(Number(m[1]));
    if (!link) return reply(res, 404, { error: `engine ${m[1]} is not simulated here` });
    const body = await readJson(req);
    const now = Date.now();
    switch (m[2]) {
      case 'start':
        link.model.setCommand('run');
        break;
      case 'stop':
        link.model.setCommand('stop');
        break;
      case 'auto':
        link.model.setCommand('auto');
        break;
      case 'scenario': {
        const b = (body ?? {}) as { name?: unknown; inSeconds?: unknown };
        if (!isScenarioName(b.name)) {
          return reply(res, 400, { error: `name must be one of ${SCENARIO_NAMES.join(', ')}`, field: 'name' });
        }
        const inS = b.inSeconds === undefined ? 0 : Number(b.inSeconds);
        if (!Number.isFinite(inS) || inS < 0) return reply(res, 400, { error: 'inSeconds must be >= 0', field: 'inSeconds' });
        link.model.setScenario(b.name, now + inS * 1000);
        break;
      }
    }
    return reply(res, 200, { ...link.model.snapshot(), connected: link.connected, buffered: link.buffered });
  }

  return new Promise((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => {
      server.off('error', reject);
      resolve(server);
    });
  });
}

export function controlAddress(server: http.Server): string {
  const a = server.address() as AddressInfo;
  return `http://127.0.0.1:${a.port}`;
}
