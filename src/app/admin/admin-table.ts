import { Signal, effect } from '@angular/core';
import { MatPaginator } from '@angular/material/paginator';
import { MatSort } from '@angular/material/sort';
import { MatTableDataSource } from '@angular/material/table';

/**
 * The wiring every administration table shares: sort and paginator follow their view children, and the
 * filter box matches a lower-cased text made of each row's visible fields. Call from a constructor.
 */
export function linkAdminTable<T>(
  source: MatTableDataSource<T>,
  sort: Signal<MatSort | undefined>,
  paginator: Signal<MatPaginator | undefined>,
  textOf: (row: T) => string,
): void {
  effect(() => {
    source.sort = sort() ?? null;
    source.paginator = paginator() ?? null;
  });
  source.filterPredicate = (row, filter) => textOf(row).toLowerCase().includes(filter);
}

/** Apply what was typed in the filter box and go back to the first page. */
export function filterAdminTable<T>(source: MatTableDataSource<T>, text: string): void {
  source.filter = text.trim().toLowerCase();
  source.paginator?.firstPage();
}
