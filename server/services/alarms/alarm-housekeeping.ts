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
  deps: { models: Models; directory: EngineDirectory; escalateAfterMs: number },
  act: HousekeepingActions,
  now: number,
): Promise<void> {
  const { Alarm } = deps.models;
  const expired = await Alarm.findAll({ where: { state: 'shelved', closedAt: null, shelvedUntil: { [Op.lte]: new Date(now) } } });
  for (const a of expired) await act.shelfExpired(a, Math.max(now, ms(a.shelvedUntil) ?? now));
  const due = await Alarm.findAll({
    where: {
      state: 'unacknowledged',
      closedAt: null,
      acknowledgedAt: null,
      escalationLevel: { [Op.lt]: LAST_LEVEL },
      lastNotifiedAt: { [Op.lte]: new Date(now - deps.escalateAfterMs) },
    },
  });
  for (const a of due) {
    const engine = deps.directory.get(a.engineId);
    if (engine) await act.escalate(a, engine);
  }
}
