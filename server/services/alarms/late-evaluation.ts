/**
 * Late readings older than the newest one already evaluated (a gateway's backlog sent after live data resumed,
 * a backfill of a gap) cannot go through an engine's live rules: those have moved on. They are evaluated for the
 * record instead, by a separate evaluator per engine over the late segment in time order. What it finds is history:
 * the newer readings already evaluated decide the present state, so a condition found there is recorded and
 * nobody is e-mailed (alarm-service recordPast). No I/O here.
 */
import type { RuleEvent } from '../../../shared/rules/rule-types';
import { EngineEvaluator, type EngineFacts, type EvalReading } from './engine-evaluator';
import type { RuleDefinition } from './rule-definitions';

/** A condition found in late data: raised at `raise.ts`, cleared at `clear.ts`, or still present at `endTs`, the segment's end. */
export interface LateFinding {
  engineId: number;
  def: RuleDefinition;
  raise: RuleEvent;
  clear: RuleEvent | null;
  endTs: number;
  /** When the readings that raised it arrived (ms). */
  arrivedAt: number;
}

interface Segment {
  ev: EngineEvaluator;
  lastTs: number;
  lastAt: number;
  open: Map<string, { def: RuleDefinition; raise: RuleEvent; arrivedAt: number }>;
}

export class LateEvaluation {
  private readonly segments = new Map<number, Segment>();

  /** `quietMs`: a segment with no late reading for this long is finished (what is still raised then is reported). */
  constructor(private readonly quietMs: number) {}

  /**
   * Feed late readings of one engine (any order). A batch that starts before the open segment's last reading
   * begins a new segment (the open one is finished first). Returns the findings completed by this batch.
   */
  feed(engineId: number, facts: EngineFacts, rules: RuleDefinition[], readings: EvalReading[], now: number): LateFinding[] {
    const out: LateFinding[] = [];
    let first = Infinity;
    let last = -Infinity;
    for (const r of readings) {
      if (r.ts < first) first = r.ts;
      if (r.ts > last) last = r.ts;
    }
    let seg = this.segments.get(engineId);
    if (seg && first < seg.lastTs) {
      out.push(...this.finishOne(engineId, seg));
      seg = undefined;
    }
    if (!seg) {
      // no no-data rule here: silence within history is the live no-data rule's business
      const ev = new EngineEvaluator(
        facts,
        rules.filter((d) => d.kind !== 'no_data'),
        { startTs: null },
      );
      seg = { ev, lastTs: -Infinity, lastAt: now, open: new Map() };
      this.segments.set(engineId, seg);
    }
    for (const hit of seg.ev.feed(readings)) {
      if (hit.event.kind === 'raise') {
        if (!seg.open.has(hit.def.key)) seg.open.set(hit.def.key, { def: hit.def, raise: hit.event, arrivedAt: now });
        continue;
      }
      const raised = seg.open.get(hit.def.key);
      if (!raised) continue;
      seg.open.delete(hit.def.key);
      out.push({ engineId, def: raised.def, raise: raised.raise, clear: hit.event, endTs: hit.event.ts, arrivedAt: raised.arrivedAt });
    }
    seg.lastTs = Math.max(seg.lastTs, last);
    seg.lastAt = now;
    return out;
  }

  /** Finish segments quiet for quietMs (all of them with `all`); returns what was still raised in them. */
  finish(now: number, all = false): LateFinding[] {
    const out: LateFinding[] = [];
    for (const [engineId, seg] of [...this.segments]) if (all || now - seg.lastAt >= this.quietMs) out.push(...this.finishOne(engineId, seg));
    return out;
  }

  /** Forget an engine (out of service, retired, rebuilt). */
  drop(engineId: number): void {
    this.segments.delete(engineId);
  }

  private finishOne(engineId: number, seg: Segment): LateFinding[] {
    this.segments.delete(engineId);
    return [...seg.open.values()].map((o) => ({ engineId, def: o.def, raise: o.raise, clear: null, endTs: seg.lastTs, arrivedAt: o.arrivedAt }));
  }
}
