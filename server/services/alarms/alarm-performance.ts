/** The alarm performance report (ISA-18.2 style figures) from the recorded activations. */
import { Op } from 'sequelize';
import { alarmPerformance, type AlarmActivation, type PerformanceReport } from '../../../shared/alarms/performance';
import type { Models } from '../../models';
import type { AlarmSettings } from './alarm-settings';
import { alarmIdsOf } from './alarm-queries';
import type { EngineDirectory } from './engine-directory';

/** Figures over [from, to); `engineIds` limits them to the caller's engines; `chatter` overrides the settings. */
export async function performanceReport(
  deps: { models: Models; directory: EngineDirectory; settings: Pick<AlarmSettings, 'chatterCount' | 'chatterWindowMs'> },
  from: number,
  to: number,
  engineIds?: number[],
  chatter: { count?: number; windowMs?: number } = {},
): Promise<PerformanceReport> {
  const { AlarmEvent, Alarm } = deps.models;
  const scoped = engineIds ? { alarmId: await alarmIdsOf(deps.models, engineIds) } : {};
  const acts = await AlarmEvent.findAll({
    where: { event: 'activate', at: { [Op.gte]: new Date(from), [Op.lt]: new Date(to) }, ...scoped },
    order: [['at', 'ASC']],
  });
  const ids = [...new Set(acts.map((e) => e.alarmId))];
  const [alarms, later] = ids.length
    ? await Promise.all([
        Alarm.findAll({ where: { id: ids }, attributes: ['id', 'engineId', 'rule'] }),
        AlarmEvent.findAll({ where: { alarmId: ids, event: ['acknowledge', 'clear'] }, order: [['at', 'ASC']] }),
      ])
    : [[], []];
  const keyOf = new Map(alarms.map((a) => [a.id, `${deps.directory.get(a.engineId)?.name ?? `engine ${a.engineId}`}/${a.rule}`]));
  const activations: AlarmActivation[] = acts.map((e) => {
    const at = new Date(e.at).getTime();
    const after = (kind: string) => later.find((l) => l.alarmId === e.alarmId && l.event === kind && new Date(l.at).getTime() >= at);
    const ack = after('acknowledge');
    const clr = after('clear');
    return {
      key: keyOf.get(e.alarmId) ?? String(e.alarmId),
      activatedAt: at,
      acknowledgedAt: ack ? new Date(ack.at).getTime() : null,
      clearedAt: clr ? new Date(clr.at).getTime() : null,
    };
  });
  return alarmPerformance(activations, {
    from,
    to,
    chatterCount: chatter.count ?? deps.settings.chatterCount,
    chatterWindowMs: chatter.windowMs ?? deps.settings.chatterWindowMs,
  });
}
