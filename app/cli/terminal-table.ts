/**
 * Plain, borderless tables for people reading a terminal, through cli-table3
 * (it handles column widths and wide characters such as Å).
 */
import Table from 'cli-table3';

export type Align = 'left' | 'right';

const CHARS = {
  top: '', 'top-mid': '', 'top-left': '', 'top-right': '',
  bottom: '', 'bottom-mid': '', 'bottom-left': '', 'bottom-right': '',
  left: '', 'left-mid': '', mid: '', 'mid-mid': '',
  right: '', 'right-mid': '', middle: '  ',
};

/** Renders `rows` under `headers`; numbers should already be formatted to their precision. */
export function formatTable(headers: string[], rows: string[][], align: Align[] = []): string {
  const table = new Table({
    head: headers,
    chars: CHARS,
    style: { head: [], border: [], 'padding-left': 0, 'padding-right': 0, compact: true },
    colAligns: headers.map((_, i) => align[i] ?? 'left'),
  });
  for (const row of rows) table.push(row);
  return table.toString().split('\n').map((line) => line.trimEnd()).join('\n');
}
