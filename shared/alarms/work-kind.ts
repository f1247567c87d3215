/**
 * The kind of work an alarm suggests, by its rule: what a technician would most likely do first. Only a
 * suggestion: the planner chooses in the dialog. Sensor and data faults are a general repair, not a coolant job.
 */
const BY_RULE: Record<string, string> = {
  no_data: 'general-repair',
  coolant_temp_stuck: 'general-repair',
  coolant_pressure_falling_stopped: 'leak-check',
  coolant_pressure_low_running: 'leak-check',
  conductivity_high: 'coolant-test',
  boiling_margin_low: 'coolant-test',
  coolant_temp_low_running: 'general-repair',
  coolant_temp_high: 'leak-check',
  coolant_temp_very_high: 'leak-check',
  coolant_temp_rising_fast: 'leak-check',
};

export function suggestedWorkKind(rule: string): string {
  return BY_RULE[rule] ?? 'general-repair';
}
