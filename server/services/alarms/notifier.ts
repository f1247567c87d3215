/**
 * Who gets the e-mail of an alarm, and escalation when nobody acknowledges it:
 * level 0 the technician on call for the engine's site, level 1 the backup, level 2 every planner.
 * A level with nobody on it is skipped. Messages go through the outbox, so none is lost.
 */
import type { Logger } from '../../logger';
import type { OutgoingMail } from '../../mail/outbox';
import type { Models } from '../../models';
import type { Alarm } from '../../models/alarm';
import type { User } from '../../models/user';
import { alarmMail } from './alarm-mail';
import type { EngineEntry } from './engine-directory';
import { onCallFor } from './oncall';
import type { RuleDefinition } from './rule-definitions';

export const LAST_LEVEL = 2;
const REASON = ['technician on call', 'backup on call', 'planner'];

export interface NotifierDeps {
  models: Models;
  enqueue(mail: OutgoingMail): Promise<unknown>;
  publicUrl: string;
  log: Logger;
}

export interface Notified {
  level: number;
  to: User[];
}

export class Notifier {
  constructor(private readonly deps: NotifierDeps) {}

  private async recipients(level: number, siteId: number): Promise<User[]> {
    if (level >= LAST_LEVEL) return this.deps.models.User.findAll({ where: { role: 'planner', disabled: false }, order: [['id', 'ASC']] });
    const { primary, backup } = await onCallFor(this.deps.models, siteId, Date.now());
    const u = level === 0 ? primary : backup;
    return u ? [u] : [];
  }

  /**
   * Mail the first level from `fromLevel` that has someone on it. Returns the level reached and who was told
   * (nobody when even the planners are missing).
   */
  async notify(alarm: Alarm, def: RuleDefinition, engine: EngineEntry, fromLevel: number, late?: { measuredAt: number; arrivedAt: number }): Promise<Notified> {
    for (let level = fromLevel; level <= LAST_LEVEL; level++) {
      const to = await this.recipients(level, engine.siteId);
      if (!to.length) continue;
      const mail = alarmMail({ alarm, def, engine, publicUrl: this.deps.publicUrl, reason: REASON[level], escalated: level > 0 && fromLevel > 0, late });
      for (const u of to) await this.deps.enqueue({ to: u.email, subject: mail.subject, text: mail.text, html: mail.html, alarmId: alarm.id });
      return { level, to };
    }
    this.deps.log.warn(`alarm ${alarm.id}: nobody to e-mail (no one on call, no planner)`);
    return { level: LAST_LEVEL, to: [] };
  }
}
