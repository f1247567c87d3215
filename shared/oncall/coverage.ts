/**
 * On-call coverage of one site: where shifts overlap and which hours nobody covers. Pure (no I/O); used by the
 * rota page (warnings before saving) and by the server (the same warnings in its answer).
 * Times are ms since the epoch; a shift covers [startsAt, endsAt).
 */

export interface CoverShift {
  id?: number | null;
  userId: number;
  startsAt: number;
  endsAt: number;
}

export interface TimeSpan {
  from: number;
  to: number;
}

export interface ShiftOverlap extends TimeSpan {
  /** The other shift it overlaps. */
  other: CoverShift;
  /** Both shifts are the same person's. */
  samePerson: boolean;
}

/** Spans of [from, to) that no shift covers, merged, earliest first. */
export function uncoveredSpans(shifts: readonly CoverShift[], from: number, to: number): TimeSpan[] {
  const sorted = shifts.filter((s) => s.endsAt > from && s.startsAt < to).sort((a, b) => a.startsAt - b.startsAt);
  const gaps: TimeSpan[] = [];
  let at = from;
  for (const s of sorted) {
    if (s.startsAt > at) gaps.push({ from: at, to: Math.min(s.startsAt, to) });
    at = Math.max(at, s.endsAt);
    if (at >= to) break;
  }
  if (at < to) gaps.push({ from: at, to });
  return gaps;
}

/** Where `candidate` overlaps the other shifts (itself, by id, left out), earliest first. */
export function overlapsOf(candidate: CoverShift, shifts: readonly CoverShift[]): ShiftOverlap[] {
  return shifts
    .filter((s) => !(candidate.id != null && s.id === candidate.id))
    .filter((s) => s.startsAt < candidate.endsAt && candidate.startsAt < s.endsAt)
    .map((s) => ({
      from: Math.max(s.startsAt, candidate.startsAt),
      to: Math.min(s.endsAt, candidate.endsAt),
      other: s,
      samePerson: s.userId === candidate.userId,
    }))
    .sort((a, b) => a.from - b.from);
}

export interface CoverageCheck {
  overlaps: ShiftOverlap[];
  /** Hours left uncovered in the window once the candidate is in (or changed). */
  uncovered: TimeSpan[];
}

/**
 * What saving `candidate` would leave: its overlaps with the site's other shifts, and the uncovered spans in
 * `window` (by default the 7 days from the start of the candidate's day, UTC) with it in place of its old self.
 */
export function checkCoverage(candidate: CoverShift, siteShifts: readonly CoverShift[], window?: TimeSpan): CoverageCheck {
  const others = siteShifts.filter((s) => !(candidate.id != null && s.id === candidate.id));
  const w = window ?? {
    from: candidate.startsAt - (candidate.startsAt % 86_400_000),
    to: candidate.startsAt - (candidate.startsAt % 86_400_000) + 7 * 86_400_000,
  };
  return { overlaps: overlapsOf(candidate, others), uncovered: uncoveredSpans([...others, candidate], w.from, w.to) };
}
