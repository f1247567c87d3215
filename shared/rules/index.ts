/** The rule evaluators, one import for the rule engine. */
export * from './rule-types';
export * from './delayed-condition';
export * from './limit-rule';
export * from './rate-rule';
export * from './no-data-rule';
export * from './stuck-rule';
export * from './boiling-margin-rule';
export * from './conductivity-rule';
export * from './heater-loss-rule';
