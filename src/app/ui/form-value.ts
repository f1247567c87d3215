import { Signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { AbstractControl, ValidationErrors } from '@angular/forms';
import { map } from 'rxjs';

/**
 * A typed form's whole value (disabled controls included) as a signal, for computed() answers. Call it in an
 * injection context (a field initializer).
 */
export function formValue<C extends AbstractControl>(control: C): Signal<ReturnType<C['getRawValue']>> {
  const read = () => control.getRawValue() as ReturnType<C['getRawValue']>;
  return toSignal(control.valueChanges.pipe(map(read)), { initialValue: read() });
}

/** A number typed as text: blank, or digits with one decimal point or comma (e.g. "-2.5", "0,8"). */
export const DECIMAL_TEXT = /^\s*[+-]?(\d+([.,]\d*)?|[.,]\d+)\s*$/;

/** Validator for a text field that takes a number: blank passes (required says otherwise), junk is `{ decimal: true }`. */
export function decimalText(control: AbstractControl<string | null>): ValidationErrors | null {
  const v = control.value ?? '';
  return v.trim() === '' || DECIMAL_TEXT.test(v) ? null : { decimal: true };
}

/** Validator for a text field that takes a number above zero: blank passes (add required), junk or 0 or less is `{ aboveZero: true }`. */
export function aboveZeroText(control: AbstractControl<string | null>): ValidationErrors | null {
  const v = control.value ?? '';
  if (v.trim() === '') return null;
  return DECIMAL_TEXT.test(v) && Number(v.trim().replace(',', '.')) > 0 ? null : { aboveZero: true };
}
