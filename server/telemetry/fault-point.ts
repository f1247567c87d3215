/**
 * Fault points for the crash tests (test/server/crash-consistency.test.ts), off unless the environment
 * names one: JW_FAULT_HOLD=<point>:<arm file>. Once the arm file exists, the next time the code passes
 * that point it writes `<arm file>.held` and stops there for good (the transaction it is in stays open),
 * so a test can SIGKILL the process at exactly that moment instead of hoping a random kill lands there.
 * Unset (production), a pass costs one comparison.
 */
import fs from 'node:fs';

export type FaultPoint = 'rollup';

const spec = process.env.JW_FAULT_HOLD ?? '';
const sep = spec.indexOf(':');
const point = sep > 0 ? spec.slice(0, sep) : '';
const armFile = sep > 0 ? spec.slice(sep + 1) : '';

export function faultPoint(name: FaultPoint): Promise<void> | null {
  if (point !== name || !fs.existsSync(armFile)) return null;
  fs.writeFileSync(`${armFile}.held`, `${process.pid}\n`);
  return new Promise<void>(() => undefined); // held until the process is killed
}
