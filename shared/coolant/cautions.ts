/** Standard cautions shown wherever the product guides coolant work. Our own plain words. */
export type CoolantCautionId = 'hot-pressure' | 'glycol-toxic' | 'protective-gear' | 'disposal' | 'defer';

export interface CoolantCaution {
  id: CoolantCautionId;
  title: string;
  text: string;
}

export const COOLANT_CAUTIONS: readonly CoolantCaution[] = Object.freeze([
  {
    id: 'hot-pressure',
    title: 'Hot coolant and pressure',
    text:
      'Never open a hot cooling system that is under pressure: coolant can flash to steam and scald. ' +
      'Stop the engine, let the coolant cool below about 50 °C (122 °F), then turn the cap slowly to its first stop to let the pressure out before taking it off.',
  },
  {
    id: 'glycol-toxic',
    title: 'Glycol is poisonous',
    text: 'Glycol coolant is harmful if swallowed and tastes sweet. Keep it, and any spill, away from children and animals.',
  },
  {
    id: 'protective-gear',
    title: 'Protect skin and eyes',
    text: 'Wear gloves and eye protection when handling coolant or additive; wash off splashes with plenty of water.',
  },
  {
    id: 'disposal',
    title: 'Collect and dispose',
    text: 'Catch drained coolant in a container; never pour it into a drain or onto the ground. Recycle or dispose of it as local rules require.',
  },
  {
    id: 'defer',
    title: 'Instructions that come first',
    text: "The engine maker's instructions, local codes and licensed practice come before anything shown here.",
  },
]);

export function coolantCaution(id: CoolantCautionId): CoolantCaution {
  const c = COOLANT_CAUTIONS.find((x) => x.id === id);
  if (!c) throw new RangeError(`id: unknown caution ${id}`);
  return c;
}
