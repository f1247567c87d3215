import crypto from 'node:crypto';
import { badRequest, conflict, notFound } from '../http-error';
import type { Device, Models } from '../models';
import { checkSecret, hashSecret } from './passwords';
import type { MetricMap } from '../../shared/sparkplug/channels';

/** 24 random bytes as base64url: 32 characters, 192 bits. */
export const newDeviceSecret = (): string => crypto.randomBytes(24).toString('base64url');

export interface DeviceWithSecret {
  device: Device;
  /** Shown once; only its hash is stored. */
  secret: string;
}

export const listDevices = (models: Models) => models.Device.findAll({ order: [['id', 'ASC']] });

async function getDevice(models: Models, id: number): Promise<Device> {
  const device = await models.Device.findByPk(id);
  if (!device) throw notFound('device');
  return device;
}

export interface SparkplugIdentityInput {
  groupId: string;
  edgeNodeId: string;
  deviceId?: string | null;
}

export async function createDevice(
  models: Models,
  input: { engineId: number; username?: string; secret?: string; sparkplug?: SparkplugIdentityInput },
  cost?: number,
): Promise<DeviceWithSecret> {
  const engine = await models.Engine.findByPk(input.engineId);
  if (!engine || engine.retiredAt) throw badRequest('engine does not exist or is retired', 'engineId');
  const username = input.username ?? `engine-${engine.id}-${crypto.randomBytes(3).toString('hex')}`;
  if (await models.Device.findOne({ where: { username } })) throw conflict('username is already in use', 'username');
  const sp = input.sparkplug;
  if (sp) {
    // one live record per Sparkplug identity: two would make an edge node's data ambiguous
    const taken = await models.Device.findOne({
      where: { sparkplugGroupId: sp.groupId, sparkplugEdgeNodeId: sp.edgeNodeId, sparkplugDeviceId: sp.deviceId ?? null, revokedAt: null },
    });
    if (taken) throw conflict('this Sparkplug identity already belongs to another device', 'sparkplug');
  }
  const secret = input.secret ?? newDeviceSecret();
  const device = await models.Device.create({
    engineId: engine.id,
    username,
    secretHash: await hashSecret(secret, cost),
    ...(sp ? { sparkplugGroupId: sp.groupId, sparkplugEdgeNodeId: sp.edgeNodeId, sparkplugDeviceId: sp.deviceId ?? null } : {}),
  });
  return { device, secret };
}

/** The metric-name mapping of a Sparkplug device; it applies from the gateway's next birth certificate. */
export async function setMetricMap(models: Models, id: number, map: MetricMap): Promise<Device> {
  const device = await getDevice(models, id);
  if (!device.sparkplugGroupId) throw badRequest('device has no Sparkplug identity', 'sparkplug');
  return device.update({ sparkplugMetricMap: Object.keys(map).length ? JSON.stringify(map) : null });
}

/** New secret, old one stops working; a revoked device comes back to life only through a new device. */
export async function rotateDevice(models: Models, id: number): Promise<DeviceWithSecret> {
  const device = await getDevice(models, id);
  if (device.revokedAt) throw conflict('device is revoked');
  const secret = newDeviceSecret();
  await device.update({ secretHash: await hashSecret(secret) });
  return { device, secret };
}

export async function revokeDevice(models: Models, id: number): Promise<Device> {
  const device = await getDevice(models, id);
  return device.revokedAt ? device : device.update({ revokedAt: new Date() });
}

/** For the broker: the device a username/secret pair belongs to, or null (unknown, wrong secret, revoked). */
export async function authenticateDevice(models: Models, username: string, secret: string): Promise<{ deviceId: number; engineId: number } | null> {
  const device = await models.Device.findOne({ where: { username } });
  if (!device || device.revokedAt) return null;
  if (!(await checkSecret(secret, device.secretHash))) return null;
  return { deviceId: device.id, engineId: device.engineId };
}
