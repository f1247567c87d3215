/**
 * Rule definitions: what a rule profile holds (one entry per rule) and the default profile.
 * The numbers are starting points of common practice (recalled, not from a published source):
 * an administrator tunes them per engine to the engine maker's figures.
 * `armedAtTempC` (running-only rules): judged only once the coolant is that warm, so a cold start's
 * near-zero pressure and quick warm-up raise nothing (see engine-evaluator.ts).
 */
import type { ChannelKey } from '../../../shared/channels';
import type { AlarmPriority } from './priority';

export const RULE_KINDS = ['limit', 'rate', 'no_data', 'stuck', 'boiling_margin', 'conductivity', 'heater_loss'] as const;
export type RuleKind = (typeof RULE_KINDS)[number];

export interface RuleDefinition {
  /** Unique within a profile; the alarm's `rule`. */
  key: string;
  kind: RuleKind;
  /** The channel watched (no_data watches every channel; boiling_margin pairs temperature with pressure). */
  channel: ChannelKey;
  priority: AlarmPriority;
  enabled: boolean;
  /** Short name shown in lists and e-mail subjects. */
  title: string;
  /** What the rule means, in a sentence, for the e-mail and the alarm page. */
  meaning: string;
  /** The first safe step for whoever answers. */
  firstStep: string;
  /** Parameters of the shared evaluator of this kind (SI units). */
  params: Record<string, unknown>;
}

/** An engine's override of one rule: parameters merged over the profile's, or switched off. */
export interface RuleOverride {
  rule: string;
  enabled: boolean;
  params: Record<string, unknown> | null;
}

export const DEFAULT_PROFILE_NAME = 'default';

const DEFER = "Follow the engine maker's instructions and your site's procedures.";
const HOT_CAP = 'Do not open the radiator or expansion-tank cap while the system is hot: it is under pressure and can spray scalding coolant.';

const HEATER_STEP =
  "Check the jacket-water heater: its supply and breaker (reset it once only; a breaker that trips again means a fault for an electrician), its thermostat setting, and its hoses and valves (open, not kinked or leaking). Isolate the heater's supply before opening its terminal box. Until the engine is warm again, tell whoever relies on it that it may start slowly or not take load at once.";

export const DEFAULT_RULES: RuleDefinition[] = [
  {
    key: 'coolant_temp_high',
    kind: 'limit',
    channel: 'coolant_temp',
    priority: 'medium',
    enabled: true,
    title: 'Coolant temperature high',
    meaning: 'The jacket-water temperature is above the warning limit: the engine is rejecting less heat than it makes.',
    firstStep: `${HOT_CAP} From a safe distance, reduce the load if you can and check that the radiator fan turns and its belt is intact. ${DEFER}`,
    params: { direction: 'high', limit: 98, deadband: 2, onDelayS: 10, offDelayS: 30 },
  },
  {
    key: 'coolant_temp_very_high',
    kind: 'limit',
    channel: 'coolant_temp',
    priority: 'high',
    enabled: true,
    title: 'Coolant temperature very high',
    meaning: 'The jacket-water temperature is above the high limit: the engine risks damage and may shut down on its own protection.',
    firstStep: `${HOT_CAP} Keep clear of the cooling system, reduce the load or stop the engine as your site allows, and check the fan and belt from a safe distance. ${DEFER}`,
    params: { direction: 'high', limit: 103, deadband: 2, onDelayS: 10, offDelayS: 30 },
  },
  {
    key: 'coolant_temp_low_running',
    kind: 'limit',
    channel: 'coolant_temp',
    priority: 'low',
    enabled: true,
    title: 'Coolant temperature low while running',
    meaning: 'The engine has run for a long time without reaching working temperature (thermostat stuck open, or a sensor fault).',
    firstStep: `Check the reading against a local gauge; have the thermostat checked at the next stop. ${DEFER}`,
    params: { direction: 'low', limit: 60, deadband: 3, onDelayS: 900, offDelayS: 60, onlyWhenRunning: true },
  },
  {
    key: 'coolant_temp_low_standby',
    kind: 'limit',
    channel: 'coolant_temp',
    priority: 'high',
    enabled: true,
    title: 'Standby engine too cold',
    meaning:
      'The jacket water of a stopped standby engine has stayed below the minimum that lets it start and take load at once. NFPA 110 asks for the jacket water of an emergency engine to be kept at not less than 32 °C (90 °F) (clause 5.3.1 in recent editions; quoted from memory, check the edition that applies to you). The jacket-water heater is most likely off or failed.',
    firstStep: `${HEATER_STEP} ${DEFER}`,
    // onlyDuty: standby engines only; the delay lets a heater bring a block back after an exercise run or a cold night
    params: { direction: 'low', limit: 32, deadband: 3, onDelayS: 900, offDelayS: 120, onlyWhenStopped: true, onlyDuty: 'standby' },
  },
  {
    key: 'heater_not_holding',
    kind: 'heater_loss',
    channel: 'coolant_temp',
    priority: 'medium',
    enabled: true,
    title: 'Jacket-water heater not holding',
    meaning:
      'The jacket water of a stopped engine is falling steadily toward ambient below its heater setpoint: the heater is not heating (switched off, breaker tripped, failed, or a blocked hose). Found before the engine is too cold to start.',
    firstStep: `${HEATER_STEP} ${DEFER}`,
    params: { belowByC: 3, minDropC: 2, windowS: 1800 },
  },
  {
    key: 'coolant_pressure_low_running',
    kind: 'limit',
    channel: 'coolant_pressure',
    priority: 'high',
    enabled: true,
    title: 'Coolant pressure low while running',
    meaning: 'The cooling system holds too little pressure while the engine runs: a leak, a faulty cap or low coolant level.',
    firstStep: `${HOT_CAP} Look for leaks from a safe distance and watch the temperature; top up only once the engine is stopped and cool. ${DEFER}`,
    params: { direction: 'low', limit: 30, deadband: 5, onDelayS: 15, offDelayS: 30, onlyWhenRunning: true, armedAtTempC: 75 },
  },
  {
    key: 'coolant_pressure_falling_stopped',
    kind: 'rate',
    channel: 'coolant_pressure',
    priority: 'high',
    enabled: true,
    title: 'Coolant pressure falling while stopped',
    meaning: 'The pressure of a stopped engine falls faster than cooling alone explains: a likely coolant leak.',
    firstStep: `Look for coolant under the engine and around hoses, pump and radiator. Do not open the system until it is cool and at zero pressure. ${DEFER}`,
    params: { direction: 'falling', ratePerMin: 3, windowS: 300, deadbandPerMin: 1, onDelayS: 60, offDelayS: 120, onlyWhenStopped: true },
  },
  {
    key: 'coolant_temp_rising_fast',
    kind: 'rate',
    channel: 'coolant_temp',
    priority: 'medium',
    enabled: true,
    title: 'Coolant temperature rising fast',
    meaning: 'The jacket-water temperature climbs faster than a normal warm-up: loss of flow, fan or coolant.',
    firstStep: `${HOT_CAP} Watch the temperature; from a safe distance check the fan, belt and for leaks. ${DEFER}`,
    params: { direction: 'rising', ratePerMin: 8, windowS: 60, deadbandPerMin: 2, onDelayS: 20, offDelayS: 60, onlyWhenRunning: true, armedAtTempC: 80 },
  },
  {
    key: 'no_data',
    kind: 'no_data',
    channel: 'coolant_temp',
    priority: 'medium',
    enabled: true,
    title: 'No data from the engine',
    meaning: "Nothing has arrived from the engine's gateway for three times its usual interval: the engine is not being watched.",
    firstStep: `Check the gateway's power and network; until data is back, have someone look at the engine's local gauges. ${DEFER}`,
    params: { factor: 3, minSilenceS: 60 },
  },
  {
    key: 'coolant_temp_stuck',
    kind: 'stuck',
    channel: 'coolant_temp',
    priority: 'medium',
    enabled: true,
    title: 'Coolant temperature not changing',
    meaning:
      'The coolant temperature reading has not moved for ten minutes although the engine started, stopped or changed load: likely a sensor or wiring fault. A flat reading at steady load alone is not taken as a fault (a sensor reporting whole degrees may repeat one value for a long time).',
    firstStep: `Compare with a local gauge; treat the engine as unwatched for temperature until the sensor is checked. ${DEFER}`,
    // resolution 0 = learned from recent values (coarsest step they all lie on); set per engine to the sensor's step
    params: { epsilon: 0.05, durationS: 600, resolution: 0, speedChangeRpm: 150, pressureChangeKpa: 15 },
  },
  {
    key: 'boiling_margin_low',
    kind: 'boiling_margin',
    channel: 'coolant_temp',
    priority: 'high',
    enabled: true,
    title: 'Boiling margin low',
    meaning:
      "The coolant is less than 10 °C below the boiling point of its water-glycol mix at the measured system pressure and the site's atmospheric pressure (from its elevation, ICAO standard atmosphere). Without a pressure reading the cap's rating is used only while the engine runs warm.",
    firstStep: `${HOT_CAP} Opening it now could make the coolant boil at once. Reduce the load from a safe distance and check the fan and belt. ${DEFER}`,
    params: { marginC: 10, deadbandC: 2, onDelayS: 10, offDelayS: 30 },
  },
  {
    key: 'conductivity_high',
    kind: 'conductivity',
    channel: 'coolant_conductivity',
    priority: 'medium',
    enabled: true,
    title: 'Coolant conductivity high',
    meaning:
      'Coolant conductivity is more than 25 % above its baseline after the last coolant change, or above 5000 µS/cm: contamination (hard make-up water, combustion gas, or additive breakdown).',
    firstStep: `Take a coolant sample for a test when the engine is stopped and cool; wear gloves and eye protection, glycol is toxic. ${DEFER}`,
    params: { risePercent: 25, absoluteLimit: 5000, deadband: 100, baselineCount: 5, onDelayS: 60, offDelayS: 60 },
  },
];

/** The profile's rules with an engine's overrides applied. */
export function effectiveRules(profile: RuleDefinition[], overrides: RuleOverride[]): RuleDefinition[] {
  const byRule = new Map(overrides.map((o) => [o.rule, o]));
  return profile.map((def) => {
    const o = byRule.get(def.key);
    if (!o) return def;
    return { ...def, enabled: def.enabled && o.enabled, params: { ...def.params, ...(o.params ?? {}) } };
  });
}

/** Least history a new rule owner replays (several servers), and the most (memory: engines are replayed a few at a time). */
export const REPLAY_MIN_MS = 10 * 60_000;
export const REPLAY_MAX_MS = 2 * 60 * 60_000;

/**
 * How much stored history rebuilds these rules' state on a new owner: the longest span any enabled rule
 * looks back over (its window or duration, plus its on and off delays), and a minute to spare, between
 * REPLAY_MIN_MS and REPLAY_MAX_MS. A 30-minute heater-loss window needs 31 minutes, not a fixed 10.
 */
export function replayMsFor(rules: RuleDefinition[]): number {
  let longestS = 0;
  for (const r of rules) {
    if (!r.enabled) continue;
    const s = (k: string) => (typeof r.params[k] === 'number' && Number.isFinite(r.params[k]) ? (r.params[k] as number) : 0);
    longestS = Math.max(longestS, Math.max(s('windowS'), s('durationS'), s('resolutionWindowS')) + s('onDelayS') + s('offDelayS'));
  }
  return Math.min(REPLAY_MAX_MS, Math.max(REPLAY_MIN_MS, (longestS + 60) * 1000));
}
