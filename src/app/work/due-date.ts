/** Calendar dates of work orders (YYYY-MM-DD): only a whole, valid date in 2000..2100 is ever sent to the server. */

export const MIN_DUE = new Date(2000, 0, 1);
export const MAX_DUE = new Date(2100, 11, 31);

/** The date as YYYY-MM-DD from its local calendar parts (the date picker gives local midnight). */
export function toDateOnly(d: Date): string {
  const p = (n: number, w = 2) => String(n).padStart(w, '0');
  return `${p(d.getFullYear(), 4)}-${p(d.getMonth() + 1)}-${p(d.getDate())}`;
}

/** YYYY-MM-DD to a local Date for the picker; null for null or anything else. */
export function fromDateOnly(s: string | null | undefined): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s ?? '');
  return m ? new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3])) : null;
}

/**
 * What the user typed or picked, checked: the date when it is whole (a four-digit year written out) and in
 * 2000..2100, else a message saying what is wrong. An empty field clears the date.
 */
export function checkDueDate(d: Date | null, typed: string): { ok: true; value: string | null } | { ok: false; message: string } {
  if (!typed.trim()) return { ok: true, value: null };
  if (!d || Number.isNaN(d.getTime())) return { ok: false, message: 'Not a date: pick one or type it in full.' };
  if (!/\d{4}/.test(typed)) return { ok: false, message: 'Type the year in full (four digits), or pick the date.' };
  if (d < MIN_DUE || d > MAX_DUE) return { ok: false, message: 'A due date between the years 2000 and 2100.' };
  return { ok: true, value: toDateOnly(d) };
}
