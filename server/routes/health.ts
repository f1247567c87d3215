import { Router } from 'express';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { ingestReport } from '../services/ingest-report';
import { route, type ApiDoc } from '../openapi/api-doc';
import { Health, IngestReport } from '../openapi/core-schemas';

// eslint-disable-next-line @typescript-eslint/no-require-imports
const VERSION: string = require('../../package.json').version;

export function healthRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'health';
  route(doc, { method: 'get', path: '/health', id: 'getHealth', tag, summary: 'Liveness and summary ingest counters', access: 'public', ok: Health });
  r.get('/health', (_req, res) => {
    const c = ctx.telemetry?.counters() ?? null;
    const external = ctx.telemetry?.brokerState?.() ?? null;
    const sparkplugHost = ctx.telemetry?.sparkplugHostState?.() ?? null;
    const broker = external ? { ...external, ...(sparkplugHost ? { sparkplugHost } : {}) } : null;
    const cluster = ctx.cluster ? { ...ctx.cluster.state(), relay: ctx.telemetry?.relayCounters?.() ?? null } : null;
    res.json({
      // degraded: up, but readings from the external broker are not arriving (or, with several servers, this one
      // has lost its lease connection and evaluates no engine)
      status: (broker && !broker.connected) || (cluster && !cluster.connected) ? 'degraded' : 'ok',
      ...(broker ? { broker } : {}),
      ...(cluster ? { cluster } : {}),
      uptimeS: Math.round((Date.now() - ctx.startedAt) / 1000),
      version: VERSION,
      ingest: c
        ? {
            received: c.received,
            stored: c.stored,
            duplicate: c.duplicate,
            rejected: Object.values(c.rejected).reduce((a, b) => a + b, 0),
            buffered: c.buffered,
          }
        : null,
    });
  });
  route(doc, {
    method: 'get',
    path: '/admin/ingest',
    id: 'getIngestReport',
    tag,
    summary: 'Full ingest counters and per-device rejections',
    access: ['admin'],
    ok: IngestReport,
  });
  r.get('/admin/ingest', requireAuth, requireRole('admin'), async (_req, res) => {
    res.json(await ingestReport(ctx));
  });
  return r;
}
