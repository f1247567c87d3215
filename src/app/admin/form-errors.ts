import { HttpErrorResponse } from '@angular/common/http';
import { AbstractControl, FormGroup } from '@angular/forms';

/** The words for a control's first error, client-side or from the server. */
export function errorText(control: AbstractControl | null | undefined, unit = ''): string {
  const e = control?.errors;
  if (!e) return '';
  const u = unit ? ` ${unit}` : '';
  if (e['server']) return String(e['server']);
  if (e['required']) return 'Required.';
  if (e['email']) return 'Not an e-mail address.';
  if (e['min']) return `At least ${e['min'].min}${u}.`;
  if (e['max']) return `At most ${e['max'].max}${u}.`;
  if (e['minlength']) return `At least ${e['minlength'].requiredLength} characters.`;
  if (e['maxlength']) return `At most ${e['maxlength'].requiredLength} characters.`;
  if (e['pattern']) return 'Not in the expected form.';
  if (e['timeZone']) return 'Not an IANA time zone (for example Europe/Berlin).';
  return 'Not valid.';
}

/**
 * Puts a server refusal onto the form: a `{ error, field }` body marks that field (its message without the
 * "field: " prefix); anything else comes back as a message for the whole form.
 */
export function applyServerError(form: FormGroup, err: unknown, fieldMap: Record<string, string> = {}): string | null {
  if (!(err instanceof HttpErrorResponse)) return 'Something went wrong. Try again.';
  if (err.status === 0) return 'The server cannot be reached. Check the network and try again.';
  if (err.status === 403) return 'Your role may not make this change.';
  const body = err.error as { error?: unknown; field?: unknown } | null;
  const message = typeof body?.error === 'string' ? body.error : `The server refused the change (${err.status}).`;
  const field = typeof body?.field === 'string' ? body.field : null;
  const name = field ? (fieldMap[field] ?? field) : null;
  const control = name ? form.get(name) : null;
  if (control) {
    const text = message.startsWith(`${field}: `) ? message.slice(field!.length + 2) : message;
    control.setErrors({ ...(control.errors ?? {}), server: capitalise(text) });
    control.markAsTouched();
    return null;
  }
  return capitalise(message);
}

function capitalise(s: string): string {
  const t = s.trim();
  return t ? t[0].toUpperCase() + t.slice(1) + (/[.!?]$/.test(t) ? '' : '.') : t;
}
