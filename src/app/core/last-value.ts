import { linkedSignal, type Resource, type WritableSignal } from '@angular/core';

/**
 * A resource's last loaded value, kept while the next request loads and after one fails, so a paged list keeps its
 * rows and its paginator in place (a resource itself shows no value while new params load). Writable, for live
 * changes between loads; the next answer replaces what was written.
 */
export function lastValue<T>(res: Resource<T | undefined>, initial: T): WritableSignal<T> {
  return linkedSignal<T | undefined, T>({
    source: () => (res.hasValue() ? res.value() : undefined),
    computation: (value, previous) => value ?? previous?.value ?? initial,
  });
}
