import { stripVTControlCharacters } from 'node:util';

const EXCERPT_LINES = 40;
/** Lines kept after each jest "●" heading: the message and its expected/received, not the code frame. */
const JEST_LINES_PER_FAILURE = 6;

const isStackFrame = (l: string) => /^\s+at /.test(l);
const isJestFailure = (l: string) => /^\s*● /.test(l) && l.trim() !== '● Console';

/**
 * The why of a failed test part in a few lines, printed again just above the summary so that the end of the
 * output (often all a CI page keeps) says which test failed and with what: node's "failing tests" section,
 * jest's "●" blocks, or else the log's last lines. Colours, blank lines and stack frames are left out.
 */
export function failureExcerpt(log: string): string[] {
  const lines = stripVTControlCharacters(log)
    .split('\n')
    .map((l) => l.trimEnd())
    .filter((l) => l.trim() !== '' && !isStackFrame(l));
  const nodeSection = lines.findIndex((l) => /^\S*\s*failing tests:$/.test(l.trim()));
  let picked: string[];
  if (nodeSection >= 0) picked = lines.slice(nodeSection + 1);
  else if (lines.some(isJestFailure)) {
    // jest prints each failure twice (as it happens and in its summary), and "● Console" for logged lines
    const headings = new Set<string>();
    picked = lines.flatMap((l, i) => {
      if (!isJestFailure(l) || headings.has(l.trim())) return [];
      headings.add(l.trim());
      const indent = l.search(/\S/);
      const body = lines.slice(i + 1).findIndex((b) => b.search(/\S/) <= indent); // the message ends where the indent does
      return lines.slice(i, i + 1 + Math.min(JEST_LINES_PER_FAILURE, body < 0 ? Infinity : body));
    });
  } else picked = lines.slice(-EXCERPT_LINES);
  return picked.slice(0, EXCERPT_LINES).map((l) => (l.length > 240 ? `${l.slice(0, 240)}…` : l));
}
