/**
 * Checklists a work order of each kind starts from. Our own words, written from what a technician
 * does; the engine maker's instructions, local codes and licensed practice come first.
 * A step is `gated` when it opens the cooling system (cap off, filter off, drain opened): it stays
 * locked until the opening check is clear (server/services/work-orders/gate.ts).
 */
import { COOLANT_CAUTIONS } from '../../shared/coolant/cautions';

export const WORK_KINDS = [
  'filter-change',
  'coolant-test',
  'drain-flush-refill',
  'leak-check',
  'top-up',
  'oil-drain',
  'weekly-inspection',
  'monthly-exercise',
  'general-repair',
] as const;
export type WorkKind = (typeof WORK_KINDS)[number];

export interface TemplateStep {
  key: string;
  title: string;
  /** What the technician records: a number with a unit, a photo, or a plain confirmation. */
  input: 'value' | 'photo' | 'confirmation';
  unit?: string;
  gated: boolean;
  optional?: boolean;
  detail?: string;
  caution?: string;
  /** Plausible range of the value in the step's unit, when the unit's common range does not fit this step. */
  range?: [number, number];
  /** Keys of earlier steps that must be done first (shared/work/step-order.ts): coolant goes in only with the cap off. */
  after?: readonly string[];
}

export interface WorkCaution {
  id: string;
  title: string;
  text: string;
}

export interface WorkTemplate {
  kind: WorkKind;
  title: string;
  /** Service-plan task this kind resets when completed (service_events.task_key), if any: the plan task of the same name. */
  serviceTask: string | null;
  /** A new conductivity baseline starts when this kind is completed (fresh coolant). */
  resetsConductivityBaseline: boolean;
  steps: TemplateStep[];
  cautions: WorkCaution[];
}

export const LOCKOUT_CAUTION: WorkCaution = {
  id: 'lockout',
  title: 'Lock out and tag out',
  text:
    'A standby engine can start by itself on a mains failure or an exercise timer. Before opening the cooling system, ' +
    'isolate the starting system (battery or air start, automatic start controller), the fuel and the jacket-water heater supply, ' +
    'lock and tag them, and relieve stored energy including coolant pressure (OSHA 29 CFR 1910.147, control of hazardous energy, ' +
    'paragraphs (d)(4) and (d)(5)).',
};

export const ROTATING_CAUTION: WorkCaution = {
  id: 'rotating',
  title: 'Rotating parts',
  text: 'Keep hands, tools, hair and loose clothing away from the fan, belts and pulleys whenever the engine runs or is not locked out.',
};

export const STEAM_CAUTION_TEXT =
  'Hot coolant and steam: open only when the opening check is clear. Turn the cap slowly to its first stop and let the pressure out before lifting it; keep your face away.';

/** Every work order shows these; the coolant ones are the shared wording (shared/coolant/cautions.ts). */
export const WORK_CAUTIONS: readonly WorkCaution[] = Object.freeze([
  LOCKOUT_CAUTION,
  ...COOLANT_CAUTIONS.slice(0, 1),
  ROTATING_CAUTION,
  ...COOLANT_CAUTIONS.slice(1),
]);

const lockoutStep: TemplateStep = {
  key: 'stop-and-lock-out',
  title: 'Stop the engine and lock out and tag out its starting system, fuel and heater supply',
  input: 'confirmation',
  gated: false,
  detail: 'Switch the controller to off, isolate the starting battery or air start, close the fuel, switch off the jacket-water heater, fit your lock and tag.',
  caution: LOCKOUT_CAUTION.text,
};
const capOffStep: TemplateStep = {
  key: 'relieve-pressure',
  title: 'Relieve the pressure and take off the filler cap',
  input: 'confirmation',
  gated: true,
  detail: 'Cover the cap with a cloth, turn it slowly to the first stop, wait until no more pressure escapes, then press down and turn it off.',
  caution: STEAM_CAUTION_TEXT,
};
const leakRunStep: TemplateStep = {
  key: 'leak-run',
  title: 'Remove your lock and tag, start the engine, run it warm and look for leaks',
  input: 'confirmation',
  gated: false,
  detail: 'Watch the parts you worked on until the thermostat opens; stop and fix any weep before leaving.',
  caution: ROTATING_CAUTION.text,
};
const capOnStep: TemplateStep = { key: 'refit-cap', title: 'Refit the filler cap and check it seats', input: 'confirmation', gated: false };

export const WORK_TEMPLATES: readonly WorkTemplate[] = Object.freeze([
  {
    kind: 'filter-change',
    title: 'Coolant filter change (spin-on)',
    serviceTask: 'filter-change',
    resetsConductivityBaseline: true,
    cautions: [...WORK_CAUTIONS],
    steps: [
      {
        key: 'choose-filter',
        title: 'Pick a charged or a blank filter as the last additive test says',
        input: 'confirmation',
        gated: false,
        detail:
          'Additive low or in range: charged filter (low also takes liquid additive). Additive above the upper limit: blank filter, and test again at the next service. Extended-life coolant: follow the coolant maker or a lab analysis. Record the filter in Parts & fluids.',
      },
      { ...lockoutStep, detail: `${lockoutStep.detail} Let the system cool: the next steps stay locked until it is stopped, cool and without pressure.` },
      capOffStep,
      { key: 'close-valves', title: 'Close the filter shut-off valves, if the engine has them', input: 'confirmation', gated: false, optional: true },
      {
        key: 'remove-filter',
        title: 'Unscrew the old filter and check that its gasket came off with it',
        input: 'confirmation',
        gated: true,
        detail: 'An old gasket left stuck on the base under the new one will leak. Catch the coolant that runs out.',
        caution: STEAM_CAUTION_TEXT,
      },
      { key: 'wipe-base', title: 'Wipe the mounting base clean with a clean, lint-free cloth', input: 'confirmation', gated: false },
      {
        key: 'oil-gasket',
        title: "Check the new filter's gasket sits in its groove and coat it with a thin film of clean engine oil",
        input: 'confirmation',
        gated: false,
        detail: 'Never grease or fuel on the gasket. Fit the new filter dry: do not fill it first.',
      },
      {
        key: 'fit-filter',
        title: 'Screw the filter on by hand until the gasket touches the base, then tighten the further amount the filter specifies',
        input: 'value',
        unit: 'turns',
        gated: false,
        detail: 'Record the turns done after the gasket touched. Do not over-tighten: hand tight plus the stated amount, no tool unless the filter says so.',
      },
      { key: 'open-valves', title: 'Open the filter shut-off valves again, if fitted', input: 'confirmation', gated: false, optional: true },
      {
        key: 'refill',
        title: 'Refill through the filler with the coolant mix to the full mark',
        input: 'value',
        unit: 'L',
        gated: false,
        after: [capOffStep.key, 'fit-filter'],
        detail: 'Record the volume added; also enter it under Parts & fluids.',
      },
      capOnStep,
      leakRunStep,
      { key: 'photo', title: 'Photo of the fitted filter', input: 'photo', gated: false, optional: true },
      { key: 'dispose-filter', title: 'Drain the used filter and dispose of it as local rules require', input: 'confirmation', gated: false },
    ],
  },
  {
    kind: 'coolant-test',
    title: 'Coolant test (strip, refractometer or lab sample)',
    serviceTask: 'coolant-test',
    resetsConductivityBaseline: false,
    cautions: [...WORK_CAUTIONS],
    steps: [
      {
        key: 'stood-overnight',
        title: 'Best: sample after the engine has stood overnight (coolant cool and settled)',
        input: 'confirmation',
        gated: false,
        optional: true,
        detail: 'Note in the remark how long the engine had been stopped.',
      },
      lockoutStep,
      {
        key: 'take-sample',
        title: 'Take the sample from a drain cock or sample valve, never from the overflow reservoir',
        input: 'confirmation',
        gated: true,
        detail: 'Let the first 60 mL or so run to waste (it is what sat in the cock), then fill a clean bottle. Close the cock.',
        caution: STEAM_CAUTION_TEXT,
      },
      {
        key: 'method',
        title: 'Say which method you used: test strip, refractometer or lab sample',
        input: 'confirmation',
        gated: false,
        detail: 'Write the method in the remark.',
      },
      { key: 'freeze-point', title: 'Freeze point of the coolant', input: 'value', unit: 'degC', gated: false },
      { key: 'glycol-percent', title: 'Glycol concentration', input: 'value', unit: '%', gated: false, optional: true },
      { key: 'sca-level', title: 'Additive (SCA) level from the test strip', input: 'value', unit: 'units/gal', gated: false, optional: true },
      { key: 'ph', title: 'pH', input: 'value', unit: 'pH', gated: false, optional: true },
      { key: 'nitrite', title: 'Nitrite from the strip or the lab report', input: 'value', unit: 'ppm', gated: false, optional: true, range: [0, 100000] },
      {
        key: 'molybdate',
        title: 'Molybdate, where the strip or the lab gives it',
        input: 'value',
        unit: 'ppm',
        gated: false,
        optional: true,
        range: [0, 100000],
      },
      { key: 'strip-photo', title: 'Photo of the strip against its colour chart, or of the sample label', input: 'photo', gated: false, optional: true },
      {
        key: 'lab-sample',
        title: 'For a lab sample: label the bottle with engine, date and run hours and send it',
        input: 'confirmation',
        gated: false,
        optional: true,
      },
      {
        ...leakRunStep,
        key: 'return-to-service',
        title: 'Remove your lock and tag and return the engine to automatic',
        detail: 'Check the controller is back in automatic and the heater is on.',
      },
    ],
  },
  {
    kind: 'drain-flush-refill',
    title: 'Drain, flush and refill',
    serviceTask: 'drain-flush-refill',
    resetsConductivityBaseline: true,
    cautions: [...WORK_CAUTIONS],
    steps: [
      lockoutStep,
      capOffStep,
      {
        key: 'drain',
        title: 'Open every drain cock (block, radiator, lowest points) into containers and drain the system',
        input: 'value',
        unit: 'L',
        gated: true,
        detail: 'Record the volume drained. Open the heater circuit valves so it drains too.',
        caution: STEAM_CAUTION_TEXT,
      },
      {
        key: 'flush-run',
        title: 'Close the drains, fill with clean water or an approved cleaner, run the engine warm, then stop it',
        input: 'confirmation',
        gated: false,
        detail: 'The cap goes back on while the engine runs. Lock out again after stopping.',
        caution: ROTATING_CAUTION.text,
      },
      {
        key: 'lock-out-again',
        title: 'Stop the engine and lock out and tag out again before draining the flush',
        input: 'confirmation',
        gated: false,
        detail: 'The lock came off to run the flush: fit your lock and tag again.',
        caution: LOCKOUT_CAUTION.text,
      },
      {
        key: 'flush-drain',
        title: 'Once cool again, open the drains and drain the flush; repeat until it runs clear',
        input: 'confirmation',
        gated: true,
        detail: 'The flush was just hot: this step waits for the opening check again.',
        caution: STEAM_CAUTION_TEXT,
      },
      { key: 'new-filter', title: 'Fit a new coolant filter (as in the filter change)', input: 'confirmation', gated: false, optional: true },
      {
        key: 'refill',
        title: "Close the drains and fill slowly with a 50/50 mix of glycol and clean water (or the mix this engine's plan sets), letting the air out",
        input: 'value',
        unit: 'L',
        gated: false,
        after: ['flush-drain'],
        detail: 'Premix before filling; use water of the quality the coolant maker asks for. Record the volume; also enter it under Parts & fluids.',
      },
      {
        key: 'initial-charge',
        title: "Add the initial additive (SCA) charge for the system's capacity, unless the coolant came precharged",
        input: 'confirmation',
        gated: false,
        detail:
          "The initial-charge calculator gives the amount for this engine's capacity. Extended-life coolant: follow the coolant maker. Record the additive under Parts & fluids.",
      },
      capOnStep,
      leakRunStep,
      { key: 'freeze-point', title: 'Freeze point of the new mix (a 50/50 ethylene glycol mix is about -37 °C)', input: 'value', unit: 'degC', gated: false },
      { key: 'dispose', title: 'Dispose of the drained coolant and flush as local rules require', input: 'confirmation', gated: false },
    ],
  },
  {
    kind: 'leak-check',
    title: 'Leak check',
    serviceTask: null,
    resetsConductivityBaseline: false,
    cautions: [...WORK_CAUTIONS],
    steps: [
      lockoutStep,
      {
        key: 'walk-round',
        title: 'Look over hoses, clamps, pump weep hole, radiator, heater, drain cocks and filter for wet spots or dried crust',
        input: 'confirmation',
        gated: false,
        detail: 'Write what you found in the remark, with where.',
      },
      { key: 'leak-photo', title: 'Photo of any leak found', input: 'photo', gated: false, optional: true },
      {
        key: 'pressure-test',
        title: 'Pressure-test at the filler neck with a hand pump to the cap rating and record the pressure held after 10 minutes',
        input: 'value',
        unit: 'kPa',
        gated: true,
        optional: true,
        detail: 'The cap comes off for this: it waits for the opening check.',
        caution: STEAM_CAUTION_TEXT,
      },
      capOnStep,
      {
        ...leakRunStep,
        key: 'return-to-service',
        title: 'Remove your lock and tag and return the engine to automatic',
        detail: 'Check the controller is back in automatic and the heater is on.',
      },
    ],
  },
  {
    kind: 'top-up',
    title: 'Coolant top-up',
    serviceTask: null,
    resetsConductivityBaseline: false,
    cautions: [...WORK_CAUTIONS],
    steps: [
      { key: 'check-level', title: 'Read the level on the overflow reservoir marks', input: 'confirmation', gated: false },
      lockoutStep,
      capOffStep,
      {
        key: 'add',
        title: 'Add coolant and record how much and what it was',
        input: 'value',
        unit: 'L',
        gated: false,
        range: [0.01, 5000],
        after: [capOffStep.key],
        detail:
          'Best is premix of the same kind and mix as in the system. Plain water dilutes the glycol and the additive; neat glycol raises the mix. ' +
          'Record the volume and what you added: the additive left is estimated from it. Also enter it under Parts & fluids.',
      },
      capOnStep,
      {
        key: 'why-low',
        title: 'Say why it was low (leak found, none found, recent drain)',
        input: 'confirmation',
        gated: false,
        detail: 'Write it in the remark. A repeat top-up calls for a leak check.',
      },
      {
        ...leakRunStep,
        key: 'return-to-service',
        title: 'Remove your lock and tag and return the engine to automatic',
        detail: 'Check the controller is back in automatic and the heater is on.',
      },
    ],
  },
  {
    kind: 'oil-drain',
    title: 'Oil drain and oil filter',
    serviceTask: 'oil-drain',
    resetsConductivityBaseline: false,
    cautions: [...WORK_CAUTIONS],
    steps: [
      lockoutStep,
      {
        key: 'drain-oil',
        title: 'Drain the engine oil while still warm (not hot) into a container',
        input: 'value',
        unit: 'L',
        gated: false,
        detail: 'Record the volume drained. Hot oil burns: let it cool to a safe handling temperature.',
      },
      { key: 'oil-filter', title: 'Change the oil filter(s) as the engine maker describes', input: 'confirmation', gated: false },
      {
        key: 'refill-oil',
        title: 'Refill with the oil grade and volume the engine maker gives, then check the dipstick',
        input: 'value',
        unit: 'L',
        gated: false,
        detail: 'Record the volume; also enter it under Parts & fluids.',
      },
      {
        key: 'coolant-filter-too',
        title: 'The coolant filter change falls due at the same interval: do it now if it is on the due list',
        input: 'confirmation',
        gated: false,
        optional: true,
        detail: 'It has its own work order, so the additive decision and the record stay with it.',
      },
      {
        key: 'leak-run',
        title: 'Remove your lock and tag, run the engine and look for oil leaks at the filter and drain plug',
        input: 'confirmation',
        gated: false,
        caution: ROTATING_CAUTION.text,
      },
      { key: 'dispose-oil', title: 'Dispose of the used oil and filter as local rules require', input: 'confirmation', gated: false },
    ],
  },
  {
    // the weekly items of NFPA 110 chapter 8 (its annex maintenance table) that touch the cooling system; clause cited from memory
    kind: 'weekly-inspection',
    title: 'Weekly standby inspection (cooling system)',
    serviceTask: 'weekly-inspection',
    resetsConductivityBaseline: false,
    cautions: [LOCKOUT_CAUTION, ROTATING_CAUTION],
    steps: [
      {
        key: 'coolant-level',
        title: 'Coolant level on the reservoir marks, read cold without opening the cap',
        input: 'confirmation',
        gated: false,
        detail: 'Low: raise a top-up and look for the leak.',
      },
      {
        key: 'heater-working',
        title: 'Jacket-water heater working: coolant temperature at the block',
        input: 'value',
        unit: 'degC',
        gated: false,
        range: [-40, 120],
        detail: 'A standby engine with a heater should read near the heater setpoint. Cold block: check the heater supply and thermostat.',
      },
      { key: 'hoses', title: 'Hoses and clamps: no cracks, swelling, softness or chafing', input: 'confirmation', gated: false },
      lockoutStep,
      {
        key: 'belts',
        title: 'Fan and pump belts: tension and wear, with the engine locked out',
        input: 'confirmation',
        gated: false,
        caution: ROTATING_CAUTION.text,
      },
      {
        key: 'leaks',
        title: 'Leaks: pump weep hole, radiator, heater, drain cocks, filter',
        input: 'confirmation',
        gated: false,
        detail: 'Write what you found in the remark, with where.',
      },
      {
        ...leakRunStep,
        key: 'return-to-service',
        title: 'Remove your lock and tag and return the engine to automatic',
        detail: 'Check the controller is back in automatic and the heater is on.',
      },
      { key: 'records', title: 'Note the readings and anything found in the remark: it is the inspection record', input: 'confirmation', gated: false },
    ],
  },
  {
    // NFPA 110 chapter 8: monthly exercise for at least 30 minutes under load (at least 30 % of the nameplate rating,
    // or the maker's minimum exhaust temperature); clause numbers cited from memory
    kind: 'monthly-exercise',
    title: 'Monthly exercise run under load',
    serviceTask: 'monthly-exercise',
    resetsConductivityBaseline: false,
    cautions: [ROTATING_CAUTION, ...COOLANT_CAUTIONS.slice(0, 1)],
    steps: [
      { key: 'pre-start', title: 'Before starting: coolant level, heater working, nothing left on or near the engine', input: 'confirmation', gated: false },
      {
        key: 'run-time',
        title: 'Run under load for at least 30 minutes: minutes run',
        input: 'value',
        unit: 'min',
        gated: false,
        range: [0, 600],
        caution: ROTATING_CAUTION.text,
      },
      { key: 'load', title: 'Load during the run, % of the nameplate rating (at least 30 %, or as the maker sets)', input: 'value', unit: '%', gated: false },
      { key: 'coolant-temp-under-load', title: 'Coolant temperature under load, once steady', input: 'value', unit: 'degC', gated: false, range: [-40, 130] },
      { key: 'coolant-pressure-under-load', title: 'Coolant pressure under load, once steady', input: 'value', unit: 'kPa', gated: false, optional: true },
      {
        key: 'leaks-running',
        title: 'Look for leaks and listen for unusual noise while it runs (keep clear of rotating parts)',
        input: 'confirmation',
        gated: false,
      },
      {
        key: 'cool-down-run',
        title: 'Cool-down run unloaded as the maker says, then back to automatic with the heater on',
        input: 'confirmation',
        gated: false,
      },
    ],
  },
  {
    kind: 'general-repair',
    title: 'General repair or sensor fault',
    serviceTask: null,
    resetsConductivityBaseline: false,
    cautions: [...WORK_CAUTIONS],
    steps: [
      {
        key: 'describe',
        title: 'Say what is wrong, as found (reading stuck, missing, implausible, or the fault seen)',
        input: 'confirmation',
        gated: false,
        detail: 'Write it in the remark.',
      },
      lockoutStep,
      {
        key: 'check-sensor',
        title: 'Check the sensor, its connector and wiring; compare with a hand gauge or thermometer',
        input: 'confirmation',
        gated: false,
        detail: 'Write the hand reading and the sensor reading in the remark.',
      },
      {
        key: 'repair',
        title: 'Repair or replace what is faulty, as the maker describes',
        input: 'confirmation',
        gated: false,
        detail: 'Write what was done in the remark; record parts under Parts & fluids.',
      },
      { key: 'photo', title: 'Photo of the repair', input: 'photo', gated: false, optional: true },
      {
        ...leakRunStep,
        key: 'return-to-service',
        title: 'Remove your lock and tag and return the engine to automatic',
        detail: 'Check the controller is back in automatic and the heater is on.',
      },
      { key: 'verify', title: 'Watch the live readings come back plausible for a few minutes', input: 'confirmation', gated: false },
    ],
  },
]);

export function workTemplate(kind: string): WorkTemplate | undefined {
  return WORK_TEMPLATES.find((t) => t.kind === kind);
}
