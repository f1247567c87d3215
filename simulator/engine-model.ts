/**
 * One simulated engine and its cooling system. Pure and deterministic: no clock, no I/O, no
 * Math.random. The caller passes timestamps; the model keeps a "physical clock" that runs `speed`
 * times faster than the timestamps, so every time constant (warm-up, cool-down, faults, the
 * exercise schedule, the daily ambient cycle) is shortened by `speed` while samples keep real
 * wall-clock timestamps.
 *
 * Thermal model (lumped capacitance, first-order lags with exact exponential steps, so any step
 * length is stable):
 * - running, thermostat closed (T < opening): coolant heats towards a high no-radiator level;
 * - running, thermostat open: held near the regulated level (83..86 °C with load);
 * - stopped: Newton's law of cooling towards ambient, held at the jacket-water heater setpoint.
 * Pressure (gauge) follows temperature: proportional to (T - 40 °C), kept below the cap rating.
 */
import type { ChannelKey } from '../shared/channels';
import { Fault, NO_FAULT, SCENARIOS, ScenarioName } from './scenarios';

export type Duty = 'standby' | 'prime' | 'continuous';
export type RunCommand = 'auto' | 'run' | 'stop';

export interface EngineSpec {
  engineId: number;
  duty: Duty;
  capacityL: number;
  capPressureKpa: number;
  heaterSetpointC: number | null;
  coolantFamily?: string;
}

export interface ModelOptions {
  seed: number;
  /** Wall-clock ms of the first state (the model's "now" before the first step). */
  startMs: number;
  /** Physical seconds per wall second (default 1). */
  speed?: number;
  /** Daily ambient cycle; defaults drawn from the seed (mean 13..23 °C, amplitude 6 °C). */
  ambientMeanC?: number;
  ambientAmplitudeC?: number;
  /** Coolant temperature at start; default depends on the run state. */
  initialTempC?: number;
  /** false: measured values equal the true state (tests of the physics). */
  noise?: boolean;
}

export type Values = Record<ChannelKey, number>;
export interface Sample {
  ts: number;
  values: Values;
}
export interface StepResult {
  sample: Sample;
  running: boolean;
  /** false while the scenario keeps the gateway silent. */
  publish: boolean;
}

// Values of the trade below are common practice (typical diesel generator sets), not from a standard.
/** Wax-element thermostats of many diesel engines start to open near 82 °C (180 °F). */
export const THERMOSTAT_OPEN_C = 82;
/** Regulated coolant temperature with the thermostat open: base + span x load (83..86 °C). */
export const REGULATED_BASE_C = 83;
export const REGULATED_LOAD_SPAN_C = 3;
/** Level the coolant heads for while the thermostat is closed (heat stays in the block). */
export const WARMUP_TARGET_C = 115;
/** Level the coolant heads for with the fan or belt gone. */
export const OVERHEAT_TARGET_C = 112;
/** Extra temperature once a leak has emptied the system. */
export const LEAK_HEAT_C = 12;
/** Expansion pressure is roughly proportional to T - 40 °C; 80 % of the cap rating at 85 °C. */
export const PRESSURE_ZERO_C = 40;
const PRESSURE_FRACTION_AT_85 = 0.8;
/** Never above this fraction of the cap rating: the cap relieves there. */
export const PRESSURE_CAP_FRACTION = 0.97;
/** Exercise of a standby set: 30 minutes a week (NFPA 110 ch. 8 asks for 30 min at least monthly). */
export const EXERCISE_MINUTES = 30;
/** A prime set is stopped each night from 23:00 to 05:00 physical time (plus a per-engine offset). */
const PRIME_STOP_HOURS = 6;

const SECOND = 1000;
const HOUR_MS = 3600 * SECOND;
const DAY_MS = 24 * HOUR_MS;
const WEEK_MS = 7 * DAY_MS;

/** mulberry32: a small, well-known 32-bit PRNG (public domain). Returns floats in [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Mix a run seed and an engine id into one 32-bit seed (murmur3 finaliser). */
export function mixSeed(seed: number, engineId: number): number {
  let h = (Math.imul(seed | 0, 0x9e3779b1) ^ Math.imul(engineId | 0, 0x85ebca77)) >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}

const clamp = (x: number, lo: number, hi: number): number => (x < lo ? lo : x > hi ? hi : x);
const round = (x: number, digits: number): number => {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
};

/** Cool-down time constant of a stopped engine, physical seconds: 40..90 min growing with capacity (common practice). */
export function coolTauSeconds(capacityL: number): number {
  return clamp(40 + 0.25 * capacityL, 40, 90) * 60;
}
/** Warm-up time constant with the thermostat closed, physical seconds: 8 min per 100 L (common practice). */
export function warmTauSeconds(capacityL: number): number {
  return 480 * clamp(capacityL / 100, 0.5, 2);
}
/** Thermostat control holds the regulated level with this lag, physical seconds. */
export const REGULATED_TAU_S = 120;
/** Pressure follows its equilibrium with this lag, physical seconds. */
export const PRESSURE_TAU_S = 60;
/** Jacket-water heater brings a cold block up to its setpoint with this lag, physical seconds. */
export const HEATER_TAU_S = 1800;

export class EngineModel {
  readonly spec: EngineSpec;
  /** Physical seconds per wall second. Settable (backfill runs at 1, live at --speed). */
  speed: number;

  private readonly rng: () => number;
  private readonly noise: boolean;
  private lastTs: number;
  private physMs: number;
  private readonly physStartMs: number;
  private readonly load: number;
  private readonly rpmNominal: number;
  private readonly ambientMean: number;
  private readonly ambientAmp: number;
  private readonly condBase: number;
  private readonly condDriftPerDay: number;
  private readonly scheduleOffsetMs: number;
  private readonly kPaPerC: number;

  private tempC: number;
  private pressureKpa: number;
  private running: boolean;
  private command: RunCommand = 'auto';
  private scenario: ScenarioName = 'normal';
  private faultStartTs = Infinity;
  private faultPhysS = 0;
  private frozenTemp: number | null = null;

  constructor(spec: EngineSpec, opts: ModelOptions) {
    if (!(spec.capacityL > 0)) throw new Error(`engine ${spec.engineId}: capacityL must be > 0`);
    if (!(spec.capPressureKpa > 0)) throw new Error(`engine ${spec.engineId}: capPressureKpa must be > 0`);
    this.spec = spec;
    this.speed = opts.speed ?? 1;
    if (!(this.speed > 0)) throw new Error('speed must be > 0');
    this.rng = mulberry32(mixSeed(opts.seed, spec.engineId));
    this.noise = opts.noise ?? true;
    this.lastTs = opts.startMs;
    this.physMs = opts.startMs;
    this.physStartMs = opts.startMs;

    const r = this.rng;
    this.load = spec.duty === 'standby' ? 0.3 + 0.2 * r() : spec.duty === 'prime' ? 0.5 + 0.3 * r() : 0.7 + 0.2 * r();
    this.rpmNominal = r() < 0.5 ? 1500 : 1800; // 50 Hz or 60 Hz sets
    this.ambientMean = opts.ambientMeanC ?? 13 + 10 * r();
    this.ambientAmp = opts.ambientAmplitudeC ?? 6;
    // Glycol coolant in service reads roughly 2000..3500 uS/cm (common practice, recalled).
    this.condBase = spec.coolantFamily === 'extended-life' ? 2400 + 600 * r() : 2200 + 700 * r();
    this.condDriftPerDay = 0.001 + 0.002 * r(); // +0.1..0.3 % a day: slow pick-up of dissolved solids
    this.scheduleOffsetMs = Math.floor(r() * 5) * DAY_MS + Math.floor(r() * 8) * HOUR_MS;
    this.kPaPerC = (spec.capPressureKpa * PRESSURE_FRACTION_AT_85) / (85 - PRESSURE_ZERO_C);

    this.running = this.scheduledRun();
    const ambient = this.trueAmbient();
    this.tempC = opts.initialTempC ?? (this.running ? this.regulatedC() : spec.heaterSetpointC !== null ? Math.max(spec.heaterSetpointC, ambient) : ambient);
    this.pressureKpa = this.pressureEquilibrium(this.tempC, 1);
  }

  /** Exercise/run schedule on the physical clock (UTC); `command` overrides it. */
  private scheduledRun(): boolean {
    const t = this.physMs;
    switch (this.spec.duty) {
      case 'continuous':
        return true;
      case 'prime': {
        // Stopped 23:00..05:00 shifted by the per-engine offset's hours.
        const h = (((t + (this.scheduleOffsetMs % DAY_MS)) % DAY_MS) + DAY_MS) % DAY_MS;
        return h >= (23 + PRIME_STOP_HOURS - 24) * HOUR_MS && h < 23 * HOUR_MS;
      }
      case 'standby': {
        // Weekly slot: Monday..Friday at 08:00..15:00 UTC depending on the engine. Epoch day 0 was a Thursday.
        const weekMs = (((t + 3 * DAY_MS) % WEEK_MS) + WEEK_MS) % WEEK_MS; // 0 = Monday 00:00
        const slot = 8 * HOUR_MS + this.scheduleOffsetMs;
        return weekMs >= slot && weekMs < slot + EXERCISE_MINUTES * 60 * SECOND;
      }
    }
  }

  private regulatedC(): number {
    return REGULATED_BASE_C + REGULATED_LOAD_SPAN_C * this.load;
  }

  /** True ambient on the physical clock: coldest near 04:00, warmest near 16:00. */
  private trueAmbient(): number {
    const hourOfDay = (((this.physMs % DAY_MS) + DAY_MS) % DAY_MS) / HOUR_MS;
    return this.ambientMean - this.ambientAmp * Math.cos((2 * Math.PI * (hourOfDay - 4)) / 24);
  }

  private pressureEquilibrium(tempC: number, inventory: number): number {
    const p = tempC > PRESSURE_ZERO_C ? this.kPaPerC * (tempC - PRESSURE_ZERO_C) * inventory : 0;
    return Math.min(p, PRESSURE_CAP_FRACTION * this.spec.capPressureKpa);
  }

  /** Approximately normal noise (Box-Muller), always drawn so the sequence does not depend on branches. */
  private gauss(sd: number): number {
    const u = 1 - this.rng();
    const v = this.rng();
    const z = Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
    return this.noise ? z * sd : 0;
  }

  setCommand(command: RunCommand): void {
    this.command = command;
  }

  /** Put a scenario on this engine; the fault begins at wall-clock `faultStartTs`. */
  setScenario(name: ScenarioName, faultStartTs: number): void {
    this.scenario = name;
    this.faultStartTs = name === 'normal' ? Infinity : faultStartTs;
    this.faultPhysS = 0;
    this.frozenTemp = null;
    if (SCENARIOS[name].requiresRunning) this.command = 'run';
  }

  /** Advance to wall-clock `ts` and return the measured sample. */
  step(ts: number): StepResult {
    const dt = (Math.max(0, ts - this.lastTs) / SECOND) * this.speed; // physical seconds
    this.lastTs = Math.max(this.lastTs, ts);
    this.physMs += dt * SECOND;

    let fault: Fault = NO_FAULT;
    if (ts >= this.faultStartTs) {
      fault = SCENARIOS[this.scenario].fault(this.faultPhysS);
      this.faultPhysS += dt;
    }
    this.running = fault.holdStopped ? false : this.command === 'run' ? true : this.command === 'stop' ? false : this.scheduledRun();

    const ambient = this.trueAmbient();
    const T = this.tempC;
    if (this.running) {
      const regulated = this.regulatedC();
      const leakHeat = LEAK_HEAT_C * clamp((0.5 - fault.inventory) / 0.5, 0, 1);
      const faultTarget = regulated + fault.coolingLoss * (OVERHEAT_TARGET_C - regulated) + leakHeat;
      let target: number;
      let tau: number;
      if (T < THERMOSTAT_OPEN_C) {
        target = Math.max(WARMUP_TARGET_C, faultTarget);
        tau = warmTauSeconds(this.spec.capacityL);
      } else {
        target = faultTarget;
        tau = faultTarget > regulated && T < faultTarget ? warmTauSeconds(this.spec.capacityL) : REGULATED_TAU_S;
      }
      this.tempC = target + (T - target) * Math.exp(-dt / tau);
    } else {
      // Newton's law of cooling: T(t) = Ta + (T0 - Ta) exp(-t / tau).
      const cooled = ambient + (T - ambient) * Math.exp(-dt / coolTauSeconds(this.spec.capacityL));
      const sp = fault.heaterOff ? null : this.spec.heaterSetpointC;
      if (sp !== null && cooled < sp) {
        // The heater holds the block at its setpoint (or brings a cold block up to it).
        this.tempC = T >= sp ? sp : sp + (T - sp) * Math.exp(-dt / HEATER_TAU_S);
      } else {
        this.tempC = cooled;
      }
    }

    const pEq = this.pressureEquilibrium(this.tempC, fault.inventory);
    this.pressureKpa = pEq + (this.pressureKpa - pEq) * Math.exp(-dt / PRESSURE_TAU_S);

    const physDays = (this.physMs - this.physStartMs) / DAY_MS;
    const conductivity = this.condBase * (1 + this.condDriftPerDay * physDays) * (1 + fault.conductivityGain);

    // Measured values: true state plus sensor noise.
    const nT = this.gauss(0.12);
    const nP = this.gauss(0.4);
    const nC = this.gauss(4);
    const nR = this.gauss(2);
    const nA = this.gauss(0.1);
    let coolantTemp = round(this.tempC + nT, 2);
    if (fault.freezeTemp) {
      if (this.frozenTemp === null) this.frozenTemp = coolantTemp;
      coolantTemp = this.frozenTemp;
    } else {
      this.frozenTemp = null;
    }
    const capMax = this.spec.capPressureKpa * 0.99;
    const values: Values = {
      coolant_temp: coolantTemp,
      coolant_pressure: round(clamp(this.pressureKpa + (this.pressureKpa > 0.5 ? nP : 0), 0, capMax), 2),
      coolant_conductivity: round(Math.max(0, conductivity + nC), 1),
      engine_speed: this.running ? Math.round(this.rpmNominal + nR) : 0,
      ambient_temp: round(ambient + nA, 2),
    };
    return { sample: { ts, values }, running: this.running, publish: !fault.silent };
  }

  /** What the control endpoint and tests may look at (true, noise-free state). */
  snapshot(): {
    engineId: number;
    running: boolean;
    command: RunCommand;
    scenario: ScenarioName;
    faultActive: boolean;
    tempC: number;
    pressureKpa: number;
    speed: number;
    rpmNominal: number;
  } {
    return {
      engineId: this.spec.engineId,
      running: this.running,
      command: this.command,
      scenario: this.scenario,
      faultActive: this.lastTs >= this.faultStartTs,
      tempC: this.tempC,
      pressureKpa: this.pressureKpa,
      speed: this.speed,
      rpmNominal: this.rpmNominal,
    };
  }
}
