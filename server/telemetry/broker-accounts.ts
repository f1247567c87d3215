/**
 * MQTT_URL with MQTT_DEVICE_ACCOUNTS=dynsec: device accounts live in the external broker's dynamic-security
 * plugin (mosquitto 2), driven over MQTT at $CONTROL/dynamic-security/v1 with the server's own (admin)
 * credentials. Each engine has a role that may publish and subscribe under its own topics only; each device
 * is a client with that role. Creating or rotating a device sets its password there (the secret is known
 * in plain text only at that moment), revoking deletes the client, which the broker disconnects at once.
 * On every (re)connect the revoked devices are deleted again, so a revoke made while the broker was away
 * still takes effect.
 */
import mqtt from 'mqtt';
import { TOPIC_ROOT } from '../../shared/topics';
import type { Logger } from '../logger';

const CONTROL = '$CONTROL/dynamic-security/v1';

export interface DeviceAccounts {
  /**
   * The device may connect with this secret and publish under its engine's topics; a Sparkplug B gateway
   * record instead under its own edge node (and device), and receive the commands addressed to it.
   */
  setDevice(username: string, secret: string, engineId: number, sparkplug?: SparkplugAccount | null): Promise<void>;
  /** The device is gone from the broker (disconnected if connected). */
  removeDevice(username: string): Promise<void>;
  /**
   * The server's own broker account may publish what the Sparkplug B host publishes: its STATE (birth and
   * will) and the commands to edge nodes (rebirth requests). Resolves once the broker has it.
   */
  hostRights(hostId: string): Promise<void>;
  close(): Promise<void>;
}

interface DynsecResponse {
  command: string;
  error?: string;
}
type Command = Record<string, unknown> & { command: string };

export const engineRole = (engineId: number) => `jw-engine-${engineId}`;
export const sparkplugRole = (username: string) => `jw-sparkplug-${username}`;

export interface SparkplugAccount {
  groupId: string;
  edgeNodeId: string;
  deviceId: string | null;
}

/**
 * A gateway's topics: births, data and deaths under its own edge node (its device, or any device under
 * the node for the node's own record); commands only to receive, never to send (denied first).
 */
export function sparkplugAcls(sp: SparkplugAccount): Array<{ acltype: string; topic: string; priority: number; allow: boolean }> {
  const node = `spBv1.0/${sp.groupId}`;
  return [
    { acltype: 'publishClientSend', topic: `${node}/NCMD/${sp.edgeNodeId}`, priority: 10, allow: false },
    { acltype: 'publishClientSend', topic: `${node}/DCMD/${sp.edgeNodeId}/#`, priority: 10, allow: false },
    { acltype: 'publishClientSend', topic: `${node}/+/${sp.edgeNodeId}`, priority: 0, allow: true },
    { acltype: 'publishClientSend', topic: `${node}/+/${sp.edgeNodeId}/${sp.deviceId ?? '+'}`, priority: 0, allow: true },
    { acltype: 'subscribePattern', topic: `${node}/NCMD/${sp.edgeNodeId}`, priority: 0, allow: true },
    { acltype: 'subscribePattern', topic: `${node}/DCMD/${sp.edgeNodeId}/#`, priority: 0, allow: true },
    // the Primary Host Application's STATE, which an edge node watches (Sparkplug 3.0, Edge Node Session Establishment)
    { acltype: 'subscribePattern', topic: 'spBv1.0/STATE/+', priority: 0, allow: true },
  ];
}

/** Role added to the server's own account: the Sparkplug host's STATE and commands (the dynsec admin role may only read them). */
export const HOST_ROLE = 'jw-sparkplug-host';
export function hostAcls(hostId: string): Array<{ acltype: string; topic: string; priority: number; allow: boolean }> {
  return [
    { acltype: 'publishClientSend', topic: `spBv1.0/STATE/${hostId}`, priority: 0, allow: true },
    { acltype: 'publishClientSend', topic: 'spBv1.0/+/NCMD/+', priority: 0, allow: true },
    { acltype: 'publishClientSend', topic: 'spBv1.0/+/DCMD/+/+', priority: 0, allow: true },
  ];
}

export function createDynsecAccounts(opts: {
  url: string;
  clientId: string;
  log: Logger;
  /** Usernames of revoked devices, deleted again on each connect. */
  revokedUsernames(): Promise<string[]>;
}): DeviceAccounts {
  const client = mqtt.connect(opts.url, { clientId: opts.clientId, clean: true, reconnectPeriod: 1000, reconnectOnConnackError: true });
  client.on('error', (err) => opts.log.warn('device accounts (broker): ' + err.message));
  // one request at a time: the broker answers in order on one response topic
  let chain: Promise<unknown> = Promise.resolve();
  let waiting: ((r: DynsecResponse[]) => void) | null = null;
  client.on('message', (topic, payload) => {
    if (topic !== `${CONTROL}/response` || !waiting) return;
    const w = waiting;
    waiting = null;
    try {
      w((JSON.parse(payload.toString()) as { responses: DynsecResponse[] }).responses ?? []);
    } catch {
      w([]);
    }
  });
  const subscribed = new Promise<void>((resolve) => {
    client.on('connect', () => {
      client.subscribe(`${CONTROL}/response`, { qos: 1 }, (err) => {
        if (err) return opts.log.error('device accounts: subscribe failed', err);
        resolve();
        void opts
          .revokedUsernames()
          .then((names) => Promise.all(names.map((n) => send([{ command: 'deleteClient', username: n }]))))
          .catch((e) => opts.log.error('device accounts: re-applying revokes failed', e));
      });
    });
  });

  const send = (commands: Command[]): Promise<DynsecResponse[]> => {
    const run = chain.then(async () => {
      await subscribed;
      return new Promise<DynsecResponse[]>((resolve, reject) => {
        const timer = setTimeout(() => {
          waiting = null;
          reject(new Error('the broker did not answer the dynamic-security command within 10 s'));
        }, 10_000);
        waiting = (r) => {
          clearTimeout(timer);
          resolve(r);
        };
        client.publish(CONTROL, JSON.stringify({ commands }), { qos: 1 });
      });
    });
    chain = run.catch(() => undefined);
    return run;
  };
  let hostRightsDone: Promise<void> | null = null;
  const failed = (responses: DynsecResponse[], ignore: RegExp) => responses.find((r) => r.error && !ignore.test(r.error));

  return {
    async setDevice(username, secret, engineId, sparkplug) {
      const rolename = sparkplug ? sparkplugRole(username) : engineRole(engineId);
      const prefix = `${TOPIC_ROOT}/${engineId}/#`;
      const created = await send([
        {
          command: 'createRole',
          rolename,
          acls: sparkplug
            ? sparkplugAcls(sparkplug)
            : [
                { acltype: 'publishClientSend', topic: prefix, priority: 0, allow: true },
                { acltype: 'subscribePattern', topic: prefix, priority: 0, allow: true },
              ],
        },
        { command: 'createClient', username, password: secret, roles: [{ rolename }] },
      ]);
      let bad = failed(created, /already exists/i);
      if (!bad && created.some((r) => r.command === 'createClient' && r.error)) {
        // an existing client (rotation): new password, same role
        bad = failed(
          await send([
            { command: 'setClientPassword', username, password: secret },
            { command: 'addClientRole', username, rolename },
          ]),
          /already/i,
        );
      }
      if (bad) throw new Error(`broker refused ${bad.command}: ${bad.error}`);
    },
    async removeDevice(username) {
      const bad = failed(await send([{ command: 'deleteClient', username }]), /not found/i);
      if (bad) throw new Error(`broker refused ${bad.command}: ${bad.error}`);
    },
    hostRights(hostId) {
      hostRightsDone ??= (async () => {
        const own = decodeURIComponent(new URL(opts.url).username);
        const acls = hostAcls(hostId);
        const created = await send([{ command: 'createRole', rolename: HOST_ROLE, acls }]);
        let bad = failed(created, /already exists/i);
        if (!bad && created[0]?.error) {
          // made before (another server, an earlier start): its ACLs set again, in case the host id changed
          bad = failed(await send(acls.map((a) => ({ command: 'addRoleACL', rolename: HOST_ROLE, ...a }))), /already/i);
        }
        bad ??= failed(await send([{ command: 'addClientRole', username: own, rolename: HOST_ROLE }]), /already/i);
        if (bad) throw new Error(`broker refused ${bad.command}: ${bad.error}`);
      })().catch((err: unknown) => {
        hostRightsDone = null; // tried again at the next take of the role
        throw err;
      });
      return hostRightsDone;
    },
    close: () => client.endAsync().then(() => undefined),
  };
}
