/** The housekeeping round of each alarm tick: shelves that have run out come back; unacknowledged alarms escalate. */
import { Op } from 'sequelize';
import type { Models } from '../../models';
import type { Alarm } from '../../models/alarm';
import { ms } from './alarm-view';
import type { EngineDirectory, EngineEntry } from './engine-directory';
import { LAST_LEVEL } from './notifier';

export interface HousekeepingActions {
  /** The shelf of this alarm ran out at `at`. */
  shelfExpired(a: Alarm, at: number): Promise<unknown>;
  /** E-mail the next level about this alarm. */
  escalate(a: Alarm, engine: EngineEntry): Promise<void>;
}

export async function housekeepingRound(
  deps: { models: Models; directory: EngineDirectory; escalateAfterMs: number; owns: (engineId: number) => boolean },
  act: HousekeepingActions,
  now: number,
): Promise<void> {
  const { Alarm } = deps.models;
  const expired = await Alarm.findAll({ where: { state: 'shelved', closedAt: null, shelvedUntil: { [Op.lte]: new Date(now) } } });
  for (const a of expired) {
    if (!deps.owns(a.engineId)) continue; // several servers: only the engine's lease holder
    await act.shelfExpired(a, Math.max(now, ms(a.shelvedUntil) ?? now));
  }
  const due = await Alarm.findAll({
    where: {
      state: 'unacknowledged',
      closedAt: null,
      acknowledgedAt: null,
      escalationLevel: { [Op.lt]: LAST_LEVEL },
      lastNotifiedAt: { [Op.lte]: new Date(now - deps.escalateAfterMs) },
    },
  });
  const cutoff = new Date(now - deps.escalateAfterMs);
  for (const a of due) {
    const engine = deps.directory.get(a.engineId);
    if (!engine || !deps.owns(a.engineId)) continue;
    // claimed once: only the server whose update finds the alarm still due sends the escalation (a lease that
    // moved between two servers' housekeeping rounds must not escalate twice)
    const [claimed] = await Alarm.update(
      { lastNotifiedAt: new Date(now) },
      { where: { id: a.id, escalationLevel: a.escalationLevel, acknowledgedAt: null, lastNotifiedAt: { [Op.lte]: cutoff } } },
    );
    if (claimed !== 1) continue;
    await act.escalate(a, engine);
  }
}
