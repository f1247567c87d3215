/**
 * Lockout/tagout carried from the step that says to lock out to the gated steps after it, and lost when a
 * step runs the engine (the lock has to come off for that). Control of hazardous energy: OSHA 29 CFR
 * 1910.147 (d)(4) apply the lock before work, (e) remove it only when the work is done.
 */
import { lockoutFor, lockStepBefore } from '../../../shared/work/lockout';

const steps = (done: Record<string, string | null>) =>
  ['stop-and-lock-out', 'relieve-pressure', 'drain', 'flush-run', 'lock-out-again', 'flush-drain', 'refill', 'leak-run'].map((key, i) => ({
    key,
    position: i + 1,
    doneAt: done[key] ?? null,
  }));
const at = (min: number) => new Date(Date.UTC(2026, 11, 2, 10, min)).toISOString();

describe('lockout carried to gated steps', () => {
  it('not carried before the lock-out step is done; carried after', () => {
    expect(lockoutFor(steps({}), { position: 2 })).toBeNull();
    expect(lockoutFor(steps({ 'stop-and-lock-out': at(0) }), { position: 2 })?.key).toBe('stop-and-lock-out');
    expect(lockoutFor(steps({ 'stop-and-lock-out': at(0) }), { position: 3 })?.key).toBe('stop-and-lock-out');
  });

  it('a step that runs the engine takes it off: the next gated step needs the lock again', () => {
    const s = steps({ 'stop-and-lock-out': at(0), 'relieve-pressure': at(20), drain: at(25), 'flush-run': at(40) });
    expect(lockoutFor(s, { position: 6 })).toBeNull();
    expect(lockStepBefore(s, { position: 6 })?.key).toBe('lock-out-again');
    const relocked = steps({ 'stop-and-lock-out': at(0), 'relieve-pressure': at(20), drain: at(25), 'flush-run': at(40), 'lock-out-again': at(45) });
    expect(lockoutFor(relocked, { position: 6 })?.key).toBe('lock-out-again');
  });

  it('a later step that runs the engine, done out of order, also takes it off', () => {
    const s = steps({ 'stop-and-lock-out': at(0), 'leak-run': at(5) });
    expect(lockoutFor(s, { position: 2 })).toBeNull();
  });
});
