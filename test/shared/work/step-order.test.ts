import { waitingFor, waitingText } from '../../../shared/work/step-order';

// Our own rule (common practice: coolant is added only after the pressure is relieved and the cap is off).
const steps = [
  { key: 'check-level', position: 1, title: 'Read the level', doneAt: '2026-12-01T10:00:00Z' },
  { key: 'stop-and-lock-out', position: 2, title: 'Lock out', doneAt: '2026-12-01T10:01:00Z' },
  { key: 'relieve-pressure', position: 3, title: 'Relieve the pressure and take off the filler cap', doneAt: null as string | null },
  { key: 'add', position: 4, title: 'Add coolant', doneAt: null },
];

test('a step waits for the named steps that are not done, first by position', () => {
  expect(waitingFor(steps, ['relieve-pressure'])?.key).toBe('relieve-pressure');
  expect(waitingFor(steps, ['add', 'relieve-pressure'])?.key).toBe('relieve-pressure');
  expect(waitingText(waitingFor(steps, ['relieve-pressure'])!)).toBe('do step 3 first: Relieve the pressure and take off the filler cap');
});

test('nothing to wait for once they are done, when none are named, or when the order has no such step', () => {
  const done = steps.map((s) => (s.key === 'relieve-pressure' ? { ...s, doneAt: '2026-12-01T10:30:00Z' } : s));
  expect(waitingFor(done, ['relieve-pressure'])).toBeNull();
  expect(waitingFor(steps, [])).toBeNull();
  expect(waitingFor(steps, undefined)).toBeNull();
  expect(waitingFor(steps, ['no-such-step'])).toBeNull();
});
