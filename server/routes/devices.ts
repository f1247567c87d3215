import { Router } from 'express';
import { z } from 'zod';
import { requireAuth, requireRole } from '../auth/middleware';
import type { AppContext } from '../app-context';
import { createDevice, listDevices, revokeDevice, rotateDevice } from '../services/devices';
import { parse, parseId } from './validate';

const createBody = z.strictObject({
  engineId: z.number().int().positive(),
  username: z.string().regex(/^[A-Za-z0-9._-]{3,64}$/, '3-64 letters, digits, dot, dash or underscore').optional(),
});

export function devicesRouter(ctx: AppContext): Router {
  const r = Router();
  r.use('/devices', requireAuth, requireRole('admin'));
  r.get('/devices', async (_req, res) => {
    res.json(await listDevices(ctx.models));
  });
  r.post('/devices', async (req, res) => {
    const { device, secret } = await createDevice(ctx.models, parse(createBody, req.body));
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId);
    res.status(201).json({ ...device.toJSON(), secret });
  });
  r.post('/devices/:id/rotate', async (req, res) => {
    const { device, secret } = await rotateDevice(ctx.models, parseId(req.params));
    await ctx.deviceAccounts?.setDevice(device.username, secret, device.engineId);
    res.json({ ...device.toJSON(), secret });
  });
  r.post('/devices/:id/revoke', async (req, res) => {
    const device = await revokeDevice(ctx.models, parseId(req.params));
    // stored first: if the broker is away now, the revoke is applied again when it is back
    await ctx.deviceAccounts?.removeDevice(device.username);
    res.json(device);
  });
  return r;
}
