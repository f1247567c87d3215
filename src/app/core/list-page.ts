/** One page of a long list as the server answers it (offset paging; see DEVELOPERS.md, "List paging"). */
export interface ListPage<T> {
  items: T[];
  /** Rows matching the filters over all pages ("1 – 50 of 1,234"). */
  total: number;
  limit: number;
  offset: number;
}

/** Rows per page on the list screens. */
export const LIST_PAGE_SIZE = 50;
export const LIST_PAGE_SIZES = [25, 50, 100];
