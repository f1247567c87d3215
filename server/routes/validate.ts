import { z } from 'zod';
import { MAX_FUTURE_MS } from '../../shared/telemetry-payload';
import { HttpError } from '../http-error';

/**
 * Characters no free text may hold: C0 controls except tab, line feed and carriage return, DEL, C1
 * controls, and the bidirectional embeddings, overrides and isolates (U+202A-202E, U+2066-2069)
 * that make a name display as something else (`report\u202Efdp.exe`).
 */
// eslint-disable-next-line no-control-regex
export const FORBIDDEN_TEXT = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;

/** The same rule as a refinement, for schemas used outside `parse`. */
export const safeText = (s: string) => !FORBIDDEN_TEXT.test(s);
export const SAFE_TEXT_MESSAGE = 'control characters and text-direction overrides are not allowed';

/** Path of the first string (key or value) holding a forbidden character, or null. */
function forbiddenTextAt(value: unknown, at: string[] = [], depth = 0): string[] | null {
  if (typeof value === 'string') return FORBIDDEN_TEXT.test(value) ? at : null;
  if (depth > 20 || value === null || typeof value !== 'object') return null;
  for (const [k, v] of Object.entries(value)) {
    if (FORBIDDEN_TEXT.test(k)) return at;
    const hit = forbiddenTextAt(v, [...at, k], depth + 1);
    if (hit) return hit;
  }
  return null;
}

/**
 * Parse with zod; on failure a 400 naming the first field at fault. Every string of the input, in
 * every schema, is checked first for control and text-direction characters (400 naming the field),
 * so no free-text field can forget the rule.
 */
export function parse<T extends z.ZodType>(schema: T, data: unknown): z.infer<T> {
  const bad = forbiddenTextAt(data);
  if (bad) {
    const field = bad.join('.');
    throw new HttpError(400, field ? `${field}: ${SAFE_TEXT_MESSAGE}` : SAFE_TEXT_MESSAGE, field || undefined);
  }
  const result = schema.safeParse(data);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  let field = issue.path.map(String).join('.');
  if (issue.code === 'unrecognized_keys' && issue.keys.length) field = [field, issue.keys[0]].filter(Boolean).join('.');
  throw new HttpError(400, field ? `${field}: ${issue.message}` : issue.message, field || undefined);
}

export const idParam = z.object({ id: z.coerce.number().int().positive() });
export const parseId = (params: unknown): number => parse(idParam, params).id;

export const timeZone = z.string().refine((tz) => {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return tz.length > 0;
  } catch {
    return false;
  }
}, 'not an IANA time zone');

/** Epoch milliseconds or an ISO 8601 string, as a number of ms. */
export const instant = z
  .union([z.coerce.number().int(), z.iso.datetime({ offset: true })])
  .transform((v) => (typeof v === 'number' ? v : Date.parse(v)))
  .describe('epoch milliseconds, or ISO 8601 with an offset or Z');

/**
 * When something was done or measured, as `instant`: not later than now, give or take the same five minutes of
 * clock difference the telemetry is allowed (a record from the future is a wrong clock or a typo).
 */
export const recordedInstant = instant.refine(
  (t) => t <= Date.now() + MAX_FUTURE_MS,
  `is in the future (more than ${MAX_FUTURE_MS / 60000} minutes ahead of the server's clock)`,
);
