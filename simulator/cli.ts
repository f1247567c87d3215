/**
 * `npm run simulate -- [options]`: plausible engines publishing over MQTT like real gateways.
 * Run with --help for the options.
 */
import fs from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { z } from 'zod';
import { EngineModel } from './engine-model';
import { DeviceRecord, Gateway } from './gateway';
import { SCENARIO_NAMES, ScenarioName, isScenarioName } from './scenarios';
import { controlAddress, startControlServer } from './control';

export const USAGE = `Usage: npm run simulate -- [options]
  --engines N          simulate the first N devices of the file (default: all)
  --rate HZ            samples per second per engine, wall clock (default 1; 0.01..50)
  --duration S         seconds of live running, then exit (default: forever; 0 = forever,
                       or with --backfill-days: exit when the history is sent)
  --seed K             integer seed; same seed, same engines (default 1)
  --scenario NAME      ${SCENARIO_NAMES.join(' | ')} (default normal)
  --scenario-engine ID engine id that gets the scenario (default: the first simulated)
  --scenario-at S      seconds after going live when the fault begins (default 10)
  --speed X            physical time runs X times faster: time constants and schedules / X (default 1)
  --devices FILE       devices file (default $DATA_DIR/demo-devices.json, DATA_DIR default ./data)
  --mqtt-url URL       broker (default mqtt://127.0.0.1:$MQTT_PORT, else the file's mqttPort, else 1883)
  --qos 0|1            publish QoS (default 1)
  --backfill-days D    first publish D days of history (max 30) as samples batches
  --backfill-step S    seconds between history samples (default 60)
  --buffer-minutes M   samples kept per engine while offline (default 60)
  --control-port P     HTTP control endpoint on 127.0.0.1:P (0 = any free port)
  --protocol P         json (our topics, default) | sparkplug (Sparkplug B; each device in the file
                       needs "sparkplug": { "groupId", "edgeNodeId", "deviceId"? } as registered)
  --status             publish retained online/offline on the status topic (with a last will)
  --verbose            print counters every 10 s
  --help`;

export interface SimOptions {
  engines: number | null;
  rateHz: number;
  durationS: number | null;
  seed: number;
  scenario: ScenarioName;
  scenarioEngine: number | null;
  scenarioAtS: number;
  speed: number;
  devicesFile: string;
  mqttUrl: string | null;
  qos: 0 | 1;
  backfillDays: number;
  backfillStepS: number;
  bufferMinutes: number;
  controlPort: number | null;
  status: boolean;
  verbose: boolean;
  protocol: 'json' | 'sparkplug';
}

export class UsageError extends Error {}

function num(raw: string | undefined, name: string, fallback: number, check: (n: number) => boolean, rule: string): number {
  if (raw === undefined) return fallback;
  const n = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(n) || !check(n)) throw new UsageError(`--${name} must be ${rule}, got "${raw}"`);
  return n;
}

export function parseCli(argv: string[], env: NodeJS.ProcessEnv = process.env): SimOptions | 'help' {
  let v;
  try {
    v = parseArgs({
      args: argv,
      strict: true,
      allowPositionals: false,
      options: {
        engines: { type: 'string' },
        rate: { type: 'string' },
        duration: { type: 'string' },
        seed: { type: 'string' },
        scenario: { type: 'string' },
        'scenario-engine': { type: 'string' },
        'scenario-at': { type: 'string' },
        speed: { type: 'string' },
        devices: { type: 'string' },
        'mqtt-url': { type: 'string' },
        qos: { type: 'string' },
        'backfill-days': { type: 'string' },
        'backfill-step': { type: 'string' },
        'buffer-minutes': { type: 'string' },
        'control-port': { type: 'string' },
        status: { type: 'boolean' },
        protocol: { type: 'string' },
        verbose: { type: 'boolean' },
        help: { type: 'boolean', short: 'h' },
      },
    }).values;
  } catch (err) {
    throw new UsageError((err as Error).message);
  }
  if (v.help) return 'help';
  const int = Number.isInteger;
  const scenario = v.scenario ?? 'normal';
  if (!isScenarioName(scenario)) throw new UsageError(`--scenario must be one of ${SCENARIO_NAMES.join(', ')}, got "${scenario}"`);
  const protocol = v.protocol ?? 'json';
  if (protocol !== 'json' && protocol !== 'sparkplug') throw new UsageError(`--protocol must be json or sparkplug, got "${protocol}"`);
  const qos = num(v.qos, 'qos', 1, (n) => n === 0 || n === 1, '0 or 1') as 0 | 1;
  const dataDir = env.DATA_DIR || './data';
  return {
    engines: v.engines === undefined ? null : num(v.engines, 'engines', 0, (n) => int(n) && n >= 1, 'an integer >= 1'),
    rateHz: num(v.rate, 'rate', 1, (n) => n >= 0.01 && n <= 50, 'a number from 0.01 to 50'),
    durationS: v.duration === undefined ? null : num(v.duration, 'duration', 0, (n) => n >= 0, 'a number of seconds >= 0'),
    seed: num(v.seed, 'seed', 1, (n) => int(n) && n >= 0 && n <= 0xffffffff, 'an integer from 0 to 4294967295'),
    scenario,
    scenarioEngine: v['scenario-engine'] === undefined ? null : num(v['scenario-engine'], 'scenario-engine', 0, (n) => int(n) && n >= 1, 'an engine id'),
    scenarioAtS: num(v['scenario-at'], 'scenario-at', 10, (n) => n >= 0, 'a number of seconds >= 0'),
    speed: num(v.speed, 'speed', 1, (n) => n > 0 && n <= 10000, 'a number > 0 and <= 10000'),
    devicesFile: path.resolve(v.devices ?? path.join(dataDir, 'demo-devices.json')),
    mqttUrl: v['mqtt-url'] ?? (env.MQTT_PORT ? `mqtt://127.0.0.1:${env.MQTT_PORT}` : null),
    qos,
    backfillDays: num(
      v['backfill-days'],
      'backfill-days',
      0,
      (n) => n >= 0 && n <= 30,
      'a number of days from 0 to 30 (the server refuses readings older than 31 days)',
    ),
    backfillStepS: num(v['backfill-step'], 'backfill-step', 60, (n) => n >= 1 && n <= 3600, 'a number of seconds from 1 to 3600'),
    bufferMinutes: num(v['buffer-minutes'], 'buffer-minutes', 60, (n) => n >= 0 && n <= 24 * 60, 'a number of minutes from 0 to 1440'),
    controlPort: v['control-port'] === undefined ? null : num(v['control-port'], 'control-port', 0, (n) => int(n) && n >= 0 && n <= 65535, 'a port number'),
    status: !!v.status,
    verbose: !!v.verbose,
    protocol,
  };
}

const devicesFileSchema = z.object({
  mqttPort: z.number().int().min(1).max(65535).optional(),
  devices: z
    .array(
      z.object({
        engineId: z.number().int().positive(),
        username: z.string().min(1),
        secret: z.string().min(1),
        engineName: z.string().optional(),
        siteId: z.number().int().optional(),
        duty: z.enum(['standby', 'prime', 'continuous']),
        capacityL: z.number().positive(),
        capPressureKpa: z.number().positive(),
        heaterSetpointC: z.number().nullable(),
        coolantFamily: z.string().optional(),
        sparkplug: z.object({ groupId: z.string().min(1), edgeNodeId: z.string().min(1), deviceId: z.string().min(1).nullish() }).optional(),
      }),
    )
    .min(1),
});

export function loadDevices(file: string): { mqttPort?: number; devices: DeviceRecord[] } {
  let text: string;
  try {
    text = fs.readFileSync(file, 'utf8');
  } catch (err) {
    throw new UsageError(`cannot read devices file ${file}: ${(err as Error).message} (run "npm run seed" first or pass --devices)`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new UsageError(`devices file ${file} is not JSON`);
  }
  const r = devicesFileSchema.safeParse(json);
  if (!r.success) {
    const i = r.error.issues[0];
    throw new UsageError(`devices file ${file}: ${i.path.join('.') || '(root)'}: ${i.message}`);
  }
  return r.data;
}

/** Run until the duration ends or `signal` aborts; resolves with the final counters. */
export async function runSimulator(o: SimOptions, opts: { log?: (s: string) => void; signal?: AbortSignal } = {}): Promise<ReturnType<Gateway['totals']>> {
  const log = opts.log ?? ((s: string) => console.log(s));
  const file = loadDevices(o.devicesFile);
  const devices = o.engines === null ? file.devices : file.devices.slice(0, o.engines);
  if (o.engines !== null && o.engines > file.devices.length) {
    log(`simulator: asked for ${o.engines} engines, the devices file has ${file.devices.length}; using all of them`);
  }
  const noIdentity = o.protocol === 'sparkplug' ? devices.find((d) => !d.sparkplug) : undefined;
  if (noIdentity)
    throw new UsageError(
      `--protocol sparkplug: engine ${noIdentity.engineId} in ${o.devicesFile} has no "sparkplug" identity (register one with POST /api/devices)`,
    );
  const scenarioEngine = o.scenarioEngine ?? devices[0].engineId;
  if (o.scenario !== 'normal' && !devices.some((d) => d.engineId === scenarioEngine)) {
    throw new UsageError(`--scenario-engine ${scenarioEngine} is not among the simulated engines (${devices.map((d) => d.engineId).join(', ')})`);
  }
  const mqttUrl = o.mqttUrl ?? `mqtt://127.0.0.1:${file.mqttPort ?? 1883}`;

  const t0 = Date.now();
  const backfillMs = o.backfillDays * 24 * 3600 * 1000;
  const startMs = t0 - backfillMs;
  const models = devices.map((d) => new EngineModel(d, { seed: o.seed, startMs, speed: backfillMs > 0 ? 1 : o.speed }));
  const gw = new Gateway(devices, models, {
    mqttUrl,
    qos: o.qos,
    rateHz: o.rateHz,
    maxBufferSamples: Math.max(1, Math.round(o.bufferMinutes * 60 * o.rateHz)),
    status: o.status,
    protocol: o.protocol,
    log: (s) => log(`simulator: ${s}`),
    onLive: (link, ts) => {
      link.model.speed = o.speed; // history runs at physical speed 1; live at --speed
      if (o.scenario !== 'normal' && link.engineId === scenarioEngine) link.model.setScenario(o.scenario, ts + o.scenarioAtS * 1000);
    },
  });

  log(
    `simulator: ${devices.length} engine(s) from ${o.devicesFile} -> ${mqttUrl} qos ${o.qos}, ${o.rateHz} Hz, speed ${o.speed}x, seed ${o.seed}, ` +
      `scenario ${o.scenario}${o.scenario !== 'normal' ? ` on engine ${scenarioEngine} at +${o.scenarioAtS} s` : ''}, ` +
      `${o.backfillDays > 0 ? `backfill ${o.backfillDays} d every ${o.backfillStepS} s, ` : ''}` +
      `duration ${o.durationS === null ? 'forever' : `${o.durationS} s`}`,
  );

  const control = o.controlPort !== null ? await startControlServer(gw, o.controlPort) : null;
  if (control) log(`simulator: control endpoint ${controlAddress(control)}`);

  const report = (prefix: string): void => {
    const t = gw.totals();
    log(
      `simulator: ${prefix} published ${t.published} readings, acked ${t.acked}, messages ${t.messages}, buffered ${t.buffered}, ` +
        `dropped ${t.dropped}, errors ${t.errors}, connected ${t.connected}/${gw.links.length}, live ${t.live}`,
    );
  };
  const verbose = o.verbose ? setInterval(() => report('progress:'), 10_000) : null;

  if (backfillMs > 0) for (const l of gw.links) l.startBackfill(startMs, o.backfillStepS * 1000, Date.now);
  const stopped = new Promise<void>((resolve) => {
    if (opts.signal?.aborted) return resolve();
    opts.signal?.addEventListener('abort', () => resolve(), { once: true });
  });
  const connecting = gw.connectAll();
  gw.startTimer();

  const historyOnly = backfillMs > 0 && o.durationS === 0;
  const allLive = (async () => {
    while (!gw.links.every((l) => l.live)) await new Promise((r) => setTimeout(r, 200));
  })();
  if (backfillMs > 0) await Promise.race([stopped, allLive]);
  void connecting; // without history, the duration counts from the first tick (samples wait in the buffer until connected)
  if (backfillMs > 0 && !opts.signal?.aborted) report('history sent:');

  if (!historyOnly && !opts.signal?.aborted) {
    const ends = [stopped];
    if (o.durationS) ends.push(new Promise((r) => setTimeout(r, o.durationS! * 1000)));
    await Promise.race(ends);
  }

  gw.stopTimer();
  if (verbose) clearInterval(verbose);
  const tEnd = Date.now();
  await gw.drain(5000);
  await gw.closeAll();
  control?.close();
  report(`done (${((Date.now() - tEnd) / 1000).toFixed(1)} s to drain and close):`);
  return gw.totals();
}

async function main(): Promise<void> {
  let o: SimOptions | 'help';
  try {
    o = parseCli(process.argv.slice(2));
  } catch (err) {
    console.error(`simulator: ${(err as Error).message}\n\n${USAGE}`);
    process.exit(2);
  }
  if (o === 'help') {
    console.log(USAGE);
    return;
  }
  const ac = new AbortController();
  let firstSignalAt = 0;
  const onSignal = (): void => {
    // npm and tsx relay the terminal's signal too, so one Ctrl-C can arrive several times at once:
    // only a second one a moment later means "do not wait for acknowledgements".
    if (firstSignalAt && Date.now() - firstSignalAt > 1000) process.exit(130);
    if (!firstSignalAt) firstSignalAt = Date.now();
    ac.abort();
  };
  process.on('SIGINT', onSignal);
  process.on('SIGTERM', onSignal);
  try {
    await runSimulator(o, { signal: ac.signal });
    process.exit(0);
  } catch (err) {
    console.error(`simulator: ${(err as Error).message}`);
    process.exit(err instanceof UsageError ? 2 : 1);
  }
}

if (require.main === module) void main();
