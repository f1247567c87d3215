import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { createDevice, listDevices, revokeDevice, rotateDevice, setMetricMap } from '../services/devices';
import { idParam, parse, parseId } from './validate';
import { route, type ApiDoc } from '../openapi/api-doc';
import { Device, DeviceWithSecret } from '../openapi/core-schemas';
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

export function devicesRouter(ctx: AppContext, doc: ApiDoc): Router {
  const r = Router();
  const tag = 'devices';
  const access = ['admin'];
  r.use('/devices', requireAuth, requireRole('admin'));
  route(doc, { method: 'get', path: '/devices', id: 'listDevices', tag, summary: 'Devices', access, ok: z.array(Device) });
  r.get('/devices', async (_req, res) => {
    res.json(await listDevices(ctx.models));
  });
  route(doc, {
    method: 'post',
    path: '/devices',
    id: 'createDevice',
    tag,
    summary: 'Create a device; the secret is returned once',
    description: 'With `sparkplug` the device may publish only under spBv1.0/{groupId}/.../{edgeNodeId}[/{deviceId}]. 409: the username is in use.',
    access,
    body: createBody,
    ok: DeviceWithSecret,
    status: 201,
    errors: [409],
  });
  r.post('/devices', async (req, res) => {
    const { device, secret } = await createDevice(ctx.models, parse(createBody, req.body));
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId, sparkplugOf(device));
    res.status(201).json({ ...device.toJSON(), secret });
  });
  route(doc, {
    method: 'post',
    path: '/devices/:id/rotate',
    id: 'rotateDeviceSecret',
    tag,
    summary: 'A new secret, returned once',
    access,
    params: idParam,
    ok: DeviceWithSecret,
  });
  r.post('/devices/:id/rotate', async (req, res) => {
    const { device, secret } = await rotateDevice(ctx.models, parseId(req.params));
    ctx.access?.deviceChanged(device.id); // the old secret and its connections end now
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId, sparkplugOf(device));
    res.json({ ...device.toJSON(), secret });
  });
  route(doc, {
    method: 'put',
    path: '/devices/:id/metric-map',
    id: 'setDeviceMetricMap',
    tag,
    summary: 'Sparkplug metric names to channels; applies from the next birth',
    description: 'e.g. { "Engine/Coolant/Temp": "coolant_temp" } or { channel, unit }.',
    access,
    params: idParam,
    body: metricMapBody,
    ok: Device,
  });
  r.put('/devices/:id/metric-map', async (req, res) => {
    const device = await setMetricMap(ctx.models, parseId(req.params), parse(metricMapBody, req.body));
    // the new names apply from the next birth: ask the edge node for one now
    if (!device.revokedAt && device.sparkplugGroupId && device.sparkplugEdgeNodeId)
      ctx.telemetry?.requestRebirth?.(device.sparkplugGroupId, device.sparkplugEdgeNodeId);
    res.json(device);
  });
  route(doc, { method: 'post', path: '/devices/:id/revoke', id: 'revokeDevice', tag, summary: 'Revoke a device', access, params: idParam, ok: Device });
  r.post('/devices/:id/revoke', async (req, res) => {
    const device = await revokeDevice(ctx.models, parseId(req.params));
    ctx.access?.deviceChanged(device.id);
    // stored first: if the broker is away now, the revoke is applied again when it is back
    await ctx.deviceAccounts?.removeDevice(device.username);
    res.json(device);
  });
  return r;
}
