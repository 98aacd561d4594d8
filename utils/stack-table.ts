/**
 * Classes that turn a table into stacked cards below the sm breakpoint: each row a card, each cell a
 * line headed by its `data-label` (the column's heading), the column headings kept for screen readers.
 * From sm up the table is an ordinary table.
 */
export const STACK_TABLE = [
  'max-sm:block max-sm:[&_tbody]:block max-sm:[&_tfoot]:block max-sm:[&_thead]:sr-only',
  'max-sm:[&_tr]:block max-sm:[&_tr]:px-4 max-sm:[&_tr]:py-3',
  'max-sm:[&_td]:block max-sm:[&_td]:px-0 max-sm:[&_td]:py-1 max-sm:[&_td]:text-left max-sm:[&_td]:whitespace-normal',
  'max-sm:[&_td]:before:block max-sm:[&_td]:before:text-[11px] max-sm:[&_td]:before:font-semibold max-sm:[&_td]:before:uppercase max-sm:[&_td]:before:tracking-wide max-sm:[&_td]:before:text-ink-soft max-sm:[&_td]:before:content-[attr(data-label)]',
].join(' ')

/** The same for short figures: each cell one line, its heading on the left and the value on the right. */
export const STACK_TABLE_INLINE = [
  'max-sm:block max-sm:[&_tbody]:block max-sm:[&_tfoot]:block max-sm:[&_thead]:sr-only',
  'max-sm:[&_tr]:block max-sm:[&_tr]:px-4 max-sm:[&_tr]:py-3',
  'max-sm:[&_td]:flex max-sm:[&_td]:items-baseline max-sm:[&_td]:justify-between max-sm:[&_td]:gap-4 max-sm:[&_td]:px-0 max-sm:[&_td]:py-1 max-sm:[&_td]:text-right',
  'max-sm:[&_td]:before:shrink-0 max-sm:[&_td]:before:text-left max-sm:[&_td]:before:text-xs max-sm:[&_td]:before:font-semibold max-sm:[&_td]:before:text-ink-soft max-sm:[&_td]:before:content-[attr(data-label)]',
].join(' ')
