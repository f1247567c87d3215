/** Input checks shared by the coolant computations. Each error names the field so forms and APIs can point at it. */

/** A RangeError that also carries the name of the offending input field. */
export class CoolantInputError extends RangeError {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(`${field}: ${message}`);
    this.name = 'CoolantInputError';
  }
}

export function requireFinite(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new CoolantInputError(field, `must be a finite number (got ${String(value)})`);
  }
  return value;
}

export function requireInRange(field: string, value: unknown, min: number, max: number, unit = ''): number {
  const v = requireFinite(field, value);
  if (v < min || v > max) {
    const u = unit ? ` ${unit}` : '';
    throw new CoolantInputError(field, `must be between ${min} and ${max}${u} (got ${v}${u})`);
  }
  return v;
}

export function requireOneOf<T extends string>(field: string, value: unknown, allowed: readonly T[]): T {
  if (typeof value !== 'string' || !(allowed as readonly string[]).includes(value)) {
    throw new CoolantInputError(field, `must be one of ${allowed.join(', ')} (got ${String(value)})`);
  }
  return value as T;
}
