import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { createDevice, listDevices, revokeDevice, rotateDevice, setMetricMap } from '../services/devices';
import { parse, parseId } from './validate';
import { CHANNEL_KEYS, type ChannelKey } from '../../shared/channels';
import { SPARKPLUG_ID_PATTERN } from '../../shared/sparkplug/topic';

const sparkplugId = z.string().regex(SPARKPLUG_ID_PATTERN, '1-64 letters, digits, dot, colon, dash or underscore');

const createBody = z.strictObject({
  engineId: z.number().int().positive(),
  username: z
    .string()
    .regex(/^[A-Za-z0-9._-]{3,64}$/, '3-64 letters, digits, dot, dash or underscore')
    .optional(),
  sparkplug: z
    .strictObject({
      groupId: sparkplugId,
      edgeNodeId: sparkplugId,
      deviceId: sparkplugId.optional(),
    })
    .optional(),
});

const channelKey = z.enum(CHANNEL_KEYS as [ChannelKey, ...ChannelKey[]]);
const metricMapBody = z
  .record(z.string().min(1).max(200), z.union([channelKey, z.strictObject({ channel: channelKey, unit: z.string().min(1).max(16).optional() })]))
  .refine((m) => Object.keys(m).length <= 500, 'at most 500 entries');

/** A gateway record's Sparkplug identity, for its broker account. */
const sparkplugOf = (d: { sparkplugGroupId: string | null; sparkplugEdgeNodeId: string | null; sparkplugDeviceId: string | null }) =>
  d.sparkplugGroupId && d.sparkplugEdgeNodeId ? { groupId: d.sparkplugGroupId, edgeNodeId: d.sparkplugEdgeNodeId, deviceId: d.sparkplugDeviceId } : null;

export function devicesRouter(ctx: AppContext): Router {
  const r = Router();
  r.use('/devices', requireAuth, requireRole('admin'));
  r.get('/devices', async (_req, res) => {
    res.json(await listDevices(ctx.models));
  });
  r.post('/devices', async (req, res) => {
    const { device, secret } = await createDevice(ctx.models, parse(createBody, req.body));
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId, sparkplugOf(device));
    res.status(201).json({ ...device.toJSON(), secret });
  });
  r.post('/devices/:id/rotate', async (req, res) => {
    const { device, secret } = await rotateDevice(ctx.models, parseId(req.params));
    ctx.access?.deviceChanged(device.id); // the old secret and its connections end now
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId, sparkplugOf(device));
    res.json({ ...device.toJSON(), secret });
  });
  r.put('/devices/:id/metric-map', async (req, res) => {
    const device = await setMetricMap(ctx.models, parseId(req.params), parse(metricMapBody, req.body));
    // the new names apply from the next birth: ask the edge node for one now
    if (!device.revokedAt && device.sparkplugGroupId && device.sparkplugEdgeNodeId)
      ctx.telemetry?.requestRebirth?.(device.sparkplugGroupId, device.sparkplugEdgeNodeId);
    res.json(device);
  });
  r.post('/devices/:id/revoke', async (req, res) => {
    const device = await revokeDevice(ctx.models, parseId(req.params));
    ctx.access?.deviceChanged(device.id);
    // stored first: if the broker is away now, the revoke is applied again when it is back
    await ctx.deviceAccounts?.removeDevice(device.username);
    res.json(device);
  });
  return r;
}
