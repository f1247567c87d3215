import { z } from 'zod';
import { HttpError } from '../http-error';

/** Parse with zod; on failure a 400 naming the first field at fault. */
export function parse<T extends z.ZodType>(schema: T, data: unknown): z.infer<T> {
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
export const instant = z.union([z.coerce.number().int(), z.iso.datetime({ offset: true })]).transform((v) => (typeof v === 'number' ? v : Date.parse(v)));
