/** The fields an engine needs besides its site and name: a 50 L standby set on 50 % ethylene glycol, conventional coolant. */
export const engineFields = {
  duty: 'standby' as const,
  capacityL: 50,
  coolantFamily: 'conventional' as const,
  glycolType: 'ethylene' as const,
  glycolPercent: 50,
  capPressureKpa: 100,
  oilDrainIntervalH: 250,
};
