/** Coolant feature: the run-hours counter fed by telemetry (one per running server). */
import type { AppContext } from '../../app-context';
import type { Telemetry } from '../../telemetry/types';
import { RunHoursCounter } from './run-hours';

const counters = new WeakMap<AppContext, RunHoursCounter>();

/** The counter of this server (created on first use, so routes can discard pending hours on a hand correction). */
export function runHoursCounterFor(ctx: AppContext): RunHoursCounter {
  let c = counters.get(ctx);
  if (!c) counters.set(ctx, (c = new RunHoursCounter(ctx.models, ctx.log)));
  return c;
}

/** Count run hours from live speed readings; returns the stop function (flushes what is pending). */
export function startRunHoursCounting(ctx: AppContext, telemetry: Pick<Telemetry, 'onReadings'>): () => Promise<void> {
  const counter = runHoursCounterFor(ctx);
  const cluster = ctx.cluster;
  // several servers see every reading: only the engine's lease holder counts its hours (else they add up twice)
  telemetry.onReadings(cluster ? (batch) => counter.onReadings(batch.filter((r) => cluster.owns(r.engineId))) : counter.onReadings);
  counter.start();
  return () => counter.stop();
}
