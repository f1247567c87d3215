/**
 * Faults the simulator can put on one engine. Pure: a scenario maps "physical seconds since the
 * fault began" to a Fault record, and the engine model applies it. All ramps run on physical
 * time, so `--speed` shortens them like every other time constant.
 */

export type ScenarioName = 'normal' | 'overheat' | 'leak' | 'contamination' | 'stuck-sensor' | 'lost-comms' | 'heater-failure';

export interface Fault {
  /** 0 = radiator works; 1 = fan or belt gone, heat is no longer rejected. */
  coolingLoss: number;
  /** Fraction of the coolant still in the system (1 = full). Pressure scales with it. */
  inventory: number;
  /** Extra conductivity as a fraction of the baseline (0.5 = +50 %). */
  conductivityGain: number;
  /** The coolant temperature sensor repeats one value. */
  freezeTemp: boolean;
  /** The gateway's uplink is down: nothing is published for this engine. */
  silent: boolean;
  /** The engine is held stopped (whatever the command) while this is true. */
  holdStopped: boolean;
  /** The jacket-water heater does not heat (failed, breaker tripped or switched off). */
  heaterOff: boolean;
}

export const NO_FAULT: Readonly<Fault> = Object.freeze({
  coolingLoss: 0,
  inventory: 1,
  conductivityGain: 0,
  freezeTemp: false,
  silent: false,
  holdStopped: false,
  heaterOff: false,
});

export interface ScenarioInfo {
  name: ScenarioName;
  description: string;
  /** The fault only shows while the engine runs, so the simulator starts the engine for it. */
  requiresRunning: boolean;
  fault(physS: number): Fault;
}

/** Physical minutes for a leak to empty the system far enough that it holds no pressure. */
export const LEAK_EMPTY_MIN = 20;
/** Physical minutes for contamination to reach its full gain. */
export const CONTAMINATION_RAMP_MIN = 30;
export const CONTAMINATION_FULL_GAIN = 0.6;
/** Physical seconds a stuck-sensor engine is held stopped before it starts (the start shows the fault). */
export const STUCK_STOP_S = 60;

const clamp01 = (x: number): number => (x < 0 ? 0 : x > 1 ? 1 : x);

export const SCENARIOS: Record<ScenarioName, ScenarioInfo> = {
  normal: {
    name: 'normal',
    description: 'no fault',
    requiresRunning: false,
    fault: () => NO_FAULT,
  },
  overheat: {
    name: 'overheat',
    description: 'fan or belt failure: coolant climbs past 100 °C towards ~110 °C while the engine keeps running',
    requiresRunning: true,
    fault: () => ({ ...NO_FAULT, coolingLoss: 1 }),
  },
  leak: {
    name: 'leak',
    description: 'coolant leak: pressure falls steadily to 0 kPa, then the temperature climbs somewhat',
    requiresRunning: true,
    fault: (physS) => ({ ...NO_FAULT, inventory: 1 - clamp01(physS / (LEAK_EMPTY_MIN * 60)) }),
  },
  contamination: {
    name: 'contamination',
    description: 'contamination (for example hard make-up water or a combustion leak): conductivity climbs by up to 60 %',
    requiresRunning: false,
    fault: (physS) => ({
      ...NO_FAULT,
      conductivityGain: CONTAMINATION_FULL_GAIN * clamp01(physS / (CONTAMINATION_RAMP_MIN * 60)),
    }),
  },
  'stuck-sensor': {
    name: 'stuck-sensor',
    description:
      'coolant temperature sensor stuck: the same value, exactly; the engine is stopped for a minute and started, and the reading does not follow (a flat reading at steady load alone is no fault)',
    requiresRunning: true,
    fault: (physS) => ({ ...NO_FAULT, freezeTemp: true, holdStopped: physS < STUCK_STOP_S }),
  },
  'heater-failure': {
    name: 'heater-failure',
    description: "jacket-water heater off (failed, breaker tripped or switched off): a stopped engine's coolant falls steadily toward ambient",
    requiresRunning: false,
    fault: () => ({ ...NO_FAULT, heaterOff: true }),
  },
  'lost-comms': {
    name: 'lost-comms',
    description: "the gateway's uplink is down: nothing arrives for the engine (kept and sent when it returns)",
    requiresRunning: false,
    fault: () => ({ ...NO_FAULT, silent: true }),
  },
};

export const SCENARIO_NAMES = Object.keys(SCENARIOS) as ScenarioName[];

export function isScenarioName(name: unknown): name is ScenarioName {
  return typeof name === 'string' && Object.prototype.hasOwnProperty.call(SCENARIOS, name);
}
