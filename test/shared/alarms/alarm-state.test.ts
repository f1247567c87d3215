import { AlarmEvent, AlarmRecord, AlarmState, newAlarm, transition, expireShelf, ALARM_STATES, isAnnunciated } from '../../../shared/alarms/alarm-state';

// Lifecycle after the ISA-18.2 / IEC 62682 alarm state transition diagram (states A..H of the
// standard: normal, unacknowledged, acknowledged, returned to normal unacknowledged, shelved,
// suppressed by design, out of service; latching not used).

const MIN = 60_000;

function apply(a: AlarmRecord, steps: [AlarmEvent, number][]): AlarmRecord {
  for (const [e, at] of steps) {
    const r = transition(a, e, at);
    if (!r.ok) throw new Error(`set-up step ${e.type} refused: ${r.reason}`);
    a = r.alarm;
  }
  return a;
}

/** One alarm in each state (condition not present in the out-of-annunciation ones). */
function inState(s: AlarmState): AlarmRecord {
  const a = newAlarm('high');
  const act: [AlarmEvent, number] = [{ type: 'activate', value: 101 }, 1000];
  switch (s) {
    case 'normal':
      return a;
    case 'unacknowledged':
      return apply(a, [act]);
    case 'acknowledged':
      return apply(a, [act, [{ type: 'acknowledge', by: 'op' }, 2000]]);
    case 'returned-unacknowledged':
      return apply(a, [act, [{ type: 'clear', value: 95 }, 2000]]);
    case 'shelved':
      return apply(a, [[{ type: 'shelve', minutes: 60, reason: 'sensor being replaced' }, 1000]]);
    case 'suppressed-by-design':
      return apply(a, [[{ type: 'suppress', reason: 'engine stopped' }, 1000]]);
    case 'out-of-service':
      return apply(a, [[{ type: 'remove-from-service', reason: 'transmitter removed' }, 1000]]);
  }
}

const EVENTS: Record<string, AlarmEvent> = {
  activate: { type: 'activate', value: 102 },
  clear: { type: 'clear', value: 96 },
  value: { type: 'value', value: 104 },
  acknowledge: { type: 'acknowledge', by: 'op' },
  shelve: { type: 'shelve', minutes: 30, reason: 'nuisance during test' },
  unshelve: { type: 'unshelve', by: 'op' },
  'shelf-expired': { type: 'shelf-expired' },
  suppress: { type: 'suppress' },
  unsuppress: { type: 'unsuppress' },
  'remove-from-service': { type: 'remove-from-service', reason: 'maintenance' },
  'return-to-service': { type: 'return-to-service' },
};

type Cell = AlarmState | `refused: ${string}`;
const R = (why: string): Cell => `refused: ${why}`;

// Rows: state; columns: event; cell: resulting state or the refusal reason.
const TABLE: Record<AlarmState, Record<keyof typeof EVENTS, Cell>> = {
  normal: {
    activate: 'unacknowledged',
    clear: R('not active'),
    value: R('not active'),
    acknowledge: R('nothing to acknowledge'),
    shelve: 'shelved',
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: 'suppressed-by-design',
    unsuppress: R('not suppressed by design'),
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  unacknowledged: {
    activate: R('already active'),
    clear: 'returned-unacknowledged',
    value: 'unacknowledged',
    acknowledge: 'acknowledged',
    shelve: 'shelved',
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: 'suppressed-by-design',
    unsuppress: R('not suppressed by design'),
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  acknowledged: {
    activate: R('already active'),
    clear: 'normal',
    value: 'acknowledged',
    acknowledge: R('already acknowledged'),
    shelve: 'shelved',
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: 'suppressed-by-design',
    unsuppress: R('not suppressed by design'),
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  'returned-unacknowledged': {
    activate: 'unacknowledged',
    clear: R('not active'),
    value: R('not active'),
    acknowledge: 'normal',
    shelve: 'shelved',
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: 'suppressed-by-design',
    unsuppress: R('not suppressed by design'),
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  shelved: {
    activate: 'shelved',
    clear: R('not active'),
    value: R('not active'),
    acknowledge: R('cannot acknowledge while shelved'),
    shelve: R('already shelved'),
    unshelve: 'normal',
    'shelf-expired': 'normal',
    suppress: R('cannot suppress while shelved'),
    unsuppress: R('not suppressed by design'),
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  'suppressed-by-design': {
    activate: 'suppressed-by-design',
    clear: R('not active'),
    value: R('not active'),
    acknowledge: R('cannot acknowledge while suppressed-by-design'),
    shelve: R('cannot shelve while suppressed-by-design'),
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: R('already suppressed by design'),
    unsuppress: 'normal',
    'remove-from-service': 'out-of-service',
    'return-to-service': R('not out of service'),
  },
  'out-of-service': {
    activate: 'out-of-service',
    clear: R('not active'),
    value: R('not active'),
    acknowledge: R('cannot acknowledge while out-of-service'),
    shelve: R('cannot shelve while out-of-service'),
    unshelve: R('not shelved'),
    'shelf-expired': R('not shelved'),
    suppress: R('cannot suppress while out-of-service'),
    unsuppress: R('not suppressed by design'),
    'remove-from-service': R('already out of service'),
    'return-to-service': 'normal',
  },
};

describe('alarm lifecycle: every state x every event', () => {
  const cases: [AlarmState, string, Cell][] = [];
  for (const s of ALARM_STATES) for (const e of Object.keys(EVENTS)) cases.push([s, e, TABLE[s][e]]);
  it('covers 7 states x 11 events', () => expect(cases).toHaveLength(77));

  it.each(cases)('%s + %s -> %s', (state, ev, expected) => {
    const a = inState(state);
    expect(a.state).toBe(state);
    // Shelf expiry is tested after the shelf time (61 min later), the rest one minute on.
    const at = ev === 'shelf-expired' ? 1000 + 61 * MIN : 1000 + MIN;
    const r = transition(a, EVENTS[ev], at);
    if (expected.startsWith('refused: ')) {
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.reason).toBe(expected.slice('refused: '.length));
      expect(r.alarm).toBe(a); // unchanged
    } else {
      expect(r.ok).toBe(true);
      expect(r.alarm.state).toBe(expected);
      const h = r.alarm.history.at(-1)!;
      expect(h).toMatchObject({ at, event: EVENTS[ev].type, from: state, to: expected });
      expect(r.alarm.history).toHaveLength(a.history.length + 1);
    }
  });
});

describe('alarm lifecycle details', () => {
  it('keeps the value that raised it, the worst value and every transition time', () => {
    let a = apply(newAlarm('high'), [
      [{ type: 'activate', value: 101, message: 'Coolant temperature high' }, 1000],
      [{ type: 'value', value: 106 }, 2000],
      [{ type: 'value', value: 103 }, 3000],
      [{ type: 'acknowledge', by: 'tech-1', comment: 'on my way' }, 4000],
      [{ type: 'clear', value: 95 }, 5000],
    ]);
    expect(a).toMatchObject({
      state: 'normal',
      raisedValue: 101,
      worstValue: 106,
      lastValue: 95,
      activatedAt: 1000,
      acknowledgedAt: 4000,
      acknowledgedBy: 'tech-1',
      clearedAt: 5000,
    });
    expect(a.history.map((h) => [h.at, h.event, h.to])).toEqual([
      [1000, 'activate', 'unacknowledged'],
      [2000, 'value', 'unacknowledged'],
      [3000, 'value', 'unacknowledged'],
      [4000, 'acknowledge', 'acknowledged'],
      [5000, 'clear', 'normal'],
    ]);
    expect(a.history[3].note).toBe('on my way');
    // a low alarm's worst value is the smallest
    a = apply(newAlarm('low'), [
      [{ type: 'activate', value: 20 }, 0],
      [{ type: 'value', value: 15 }, 1],
      [{ type: 'value', value: 18 }, 2],
    ]);
    expect(a.worstValue).toBe(15);
  });

  it('a condition that came while shelved / suppressed / out of service is annunciated when the alarm returns', () => {
    for (const [hide, show] of [
      [{ type: 'shelve', minutes: 10, reason: 'noisy' }, { type: 'unshelve' }],
      [{ type: 'suppress' }, { type: 'unsuppress' }],
      [{ type: 'remove-from-service', reason: 'repair' }, { type: 'return-to-service' }],
    ] as [AlarmEvent, AlarmEvent][]) {
      const a = apply(newAlarm(), [
        [hide, 0],
        [{ type: 'activate', value: 110 }, 1000],
      ]);
      expect(isAnnunciated(a.state)).toBe(false);
      expect(a.active).toBe(true);
      const back = transition(a, show, 2000);
      expect(back.ok && back.alarm.state).toBe('unacknowledged');
    }
  });

  it('a condition that came and went while shelved leaves nothing to annunciate', () => {
    const a = apply(newAlarm(), [
      [{ type: 'shelve', minutes: 10, reason: 'noisy' }, 0],
      [{ type: 'activate', value: 110 }, 1],
      [{ type: 'clear' }, 2],
      [{ type: 'unshelve' }, 3],
    ]);
    expect(a.state).toBe('normal');
  });

  it('shelving needs 1..1440 whole minutes and a reason', () => {
    const a = inState('unacknowledged');
    const bad: [number, string, string][] = [
      [0, 'x', 'shelve time must be a whole number of minutes from 1 to 1440'],
      [1441, 'x', 'shelve time must be a whole number of minutes from 1 to 1440'],
      [2.5, 'x', 'shelve time must be a whole number of minutes from 1 to 1440'],
      [30, '   ', 'a reason is required to shelve'],
    ];
    for (const [minutes, reason, why] of bad) {
      const r = transition(a, { type: 'shelve', minutes, reason }, 5000);
      expect(r).toMatchObject({ ok: false, reason: why });
    }
    for (const minutes of [1, 1440]) {
      const r = transition(a, { type: 'shelve', minutes, reason: 'ok' }, 5000);
      expect(r.ok && r.alarm.shelvedUntil).toBe(5000 + minutes * MIN);
    }
  });

  it('the shelf expires only when its time has run out; expireShelf does it on a tick', () => {
    const a = apply(newAlarm(), [
      [{ type: 'shelve', minutes: 5, reason: 'noisy' }, 0],
      [{ type: 'activate', value: 110 }, 1000],
    ]);
    expect(transition(a, { type: 'shelf-expired' }, 5 * MIN - 1)).toMatchObject({ ok: false, reason: 'shelf time has not run out' });
    expect(expireShelf(a, 5 * MIN - 1)).toBe(a);
    const e = expireShelf(a, 7 * MIN);
    expect(e.state).toBe('unacknowledged');
    expect(e.history.at(-1)).toMatchObject({ event: 'shelf-expired', at: 5 * MIN });
  });

  it('refuses time going backwards and taking out of service without a reason', () => {
    const a = inState('unacknowledged');
    expect(transition(a, { type: 'acknowledge' }, 500)).toMatchObject({ ok: false, reason: 'time is earlier than the last recorded transition' });
    expect(transition(a, { type: 'remove-from-service', reason: '' }, 5000)).toMatchObject({
      ok: false,
      reason: 'a reason is required to take an alarm out of service',
    });
  });
});
