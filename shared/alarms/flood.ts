/**
 * Alarm flood detection with the ISA-18.2 benchmark (ANSI/ISA-18.2-2016, alarm system
 * performance, as quoted in our reference notes): a flood begins when more than 10 alarms
 * are annunciated in 10 minutes (for one operator) and ends when fewer than 5 alarms fall in
 * the trailing 10 minutes. Counting is over a sliding window (t - 10 min, t].
 */

export interface FloodParams {
  windowMs: number;
  /** Flood begins when the count in the window is above this. */
  beginAbove: number;
  /** Flood ends when the count in the window is below this. */
  endBelow: number;
}

export const ISA_18_2_FLOOD: Readonly<FloodParams> = Object.freeze({ windowMs: 10 * 60_000, beginAbove: 10, endBelow: 5 });

export interface FloodState {
  /** Annunciation times inside the window, ascending. */
  recent: number[];
  flooding: boolean;
  since: number | null;
}

export interface FloodEvent {
  kind: 'flood-begin' | 'flood-end';
  ts: number;
  /** Alarms in the window at that moment. */
  count: number;
}

export interface FloodPeriod {
  start: number;
  /** null while still flooding at the end of the data. */
  end: number | null;
  /** Alarms annunciated from start to end. */
  alarms: number;
  peakCount: number;
}

export function initialFloodState(): FloodState {
  return { recent: [], flooding: false, since: null };
}

/**
 * Advance to `input.ts`; `input.alarm` true when one alarm was annunciated at that time (call
 * once per alarm), false or absent for a tick. Inputs in time order.
 */
export function stepFlood(
  state: FloodState,
  input: { ts: number; alarm?: boolean },
  params: FloodParams = ISA_18_2_FLOOD,
): { state: FloodState; events: FloodEvent[] } {
  const events: FloodEvent[] = [];
  const recent = [...state.recent];
  let { flooding, since } = state;
  // Alarms age out one by one at their time + window; the flood can end at such an exact moment.
  while (recent.length && recent[0] + params.windowMs <= input.ts) {
    const leaveAt = recent[0] + params.windowMs;
    recent.shift();
    if (flooding && recent.length < params.endBelow) {
      events.push({ kind: 'flood-end', ts: leaveAt, count: recent.length });
      flooding = false;
      since = null;
    }
  }
  if (input.alarm) {
    recent.push(input.ts);
    if (!flooding && recent.length > params.beginAbove) {
      flooding = true;
      since = input.ts;
      events.push({ kind: 'flood-begin', ts: input.ts, count: recent.length });
    }
  }
  return { state: { recent, flooding, since }, events };
}

/** Flood periods in a list of annunciation times (any order), evaluated up to `until` (default: last alarm + window). */
export function floodPeriods(times: readonly number[], params: FloodParams = ISA_18_2_FLOOD, until?: number): FloodPeriod[] {
  const sorted = [...times].sort((a, b) => a - b);
  const periods: FloodPeriod[] = [];
  let state = initialFloodState();
  let open: FloodPeriod | null = null;
  const apply = (events: FloodEvent[]) => {
    for (const e of events) {
      if (e.kind === 'flood-begin') open = { start: e.ts, end: null, alarms: 0, peakCount: e.count };
      else if (open) {
        open.end = e.ts;
        periods.push(open);
        open = null;
      }
    }
  };
  for (const t of sorted) {
    const r = stepFlood(state, { ts: t, alarm: true }, params);
    state = r.state;
    apply(r.events);
    const o = open as FloodPeriod | null;
    if (o) {
      o.alarms += o.start === t && r.events.some((e) => e.kind === 'flood-begin') ? o.peakCount : 1;
      o.peakCount = Math.max(o.peakCount, state.recent.length);
    }
  }
  const end = until ?? (sorted.length ? sorted[sorted.length - 1] + params.windowMs : 0);
  const r = stepFlood(state, { ts: end }, params);
  apply(r.events);
  if (open) periods.push(open);
  return periods;
}
