/** A plain accessible table: caption, column headers, row headers in the first column. */
import { element, type Child } from '../dom';

export interface Column<T> {
  header: string;
  cell: (row: T, index: number) => Child | Child[];
  /** Right-aligned, tabular figures. */
  numeric?: boolean;
  /** A short explanation shown as the header's tooltip. */
  title?: string;
}

export interface TableOptions<T> {
  className?: string;
  /** Called for each body row, e.g. to register it for highlighting. */
  decorateRow?: (tr: HTMLTableRowElement, row: T, index: number) => void;
}

export function dataTable<T>(caption: string, columns: readonly Column<T>[], rows: readonly T[], options: TableOptions<T> = {}): HTMLTableElement {
  const head = element('thead', {}, [
    element(
      'tr',
      {},
      columns.map((column) =>
        element('th', { text: column.header, className: column.numeric ? 'numeric' : undefined, attributes: { scope: 'col', title: column.title } }),
      ),
    ),
  ]);
  const body = element(
    'tbody',
    {},
    rows.map((row, index) => {
      const tr = element(
        'tr',
        {},
        columns.map((column, c) => {
          const content = column.cell(row, index);
          const children = Array.isArray(content) ? content : [content];
          return c === 0
            ? element('th', { attributes: { scope: 'row' }, className: column.numeric ? 'numeric' : undefined }, children)
            : element('td', { className: column.numeric ? 'numeric' : undefined }, children);
        }),
      );
      options.decorateRow?.(tr, row, index);
      return tr;
    }),
  );
  return element('table', { className: `data-table ${options.className ?? ''}`.trim() }, [element('caption', { text: caption }), head, body]);
}

/** A horizontal bar for a value in [0, 1] of the column's scale, with the value as text beside it. */
export function magnitudeBar(fraction: number, label: string): HTMLElement {
  const bar = element('span', { className: 'bar bar-magnitude' });
  bar.style.width = `${Math.max(0, Math.min(1, fraction)) * 100}%`;
  return element('span', { className: 'bar-cell' }, [element('span', { className: 'bar-track', attributes: { 'aria-hidden': 'true' } }, [bar]), element('span', { className: 'bar-value', text: label })]);
}

/** A bar growing left (negative) or right (positive) from the middle, for values in [−1, 1] of the scale. */
export function signedBar(fraction: number, label: string): HTMLElement {
  const clamped = Math.max(-1, Math.min(1, fraction));
  const bar = element('span', { className: clamped < 0 ? 'bar bar-negative' : 'bar bar-positive' });
  bar.style.left = `${50 + Math.min(0, clamped) * 50}%`;
  bar.style.width = `${Math.abs(clamped) * 50}%`;
  return element('span', { className: 'bar-cell' }, [
    element('span', { className: 'bar-track bar-track-signed', attributes: { 'aria-hidden': 'true' } }, [element('span', { className: 'bar-axis' }), bar]),
    element('span', { className: 'bar-value', text: label }),
  ]);
}
