/**
 * Tables for the terminal (aligned plain text) and for Markdown (pipe tables), and the escaping
 * that keeps names taken from a data file (which may hold `|`, newlines or control characters)
 * from breaking either layout.
 */

export type Align = 'left' | 'right';

/** Control characters (newlines, tabs, escape sequences) shown as `\n`, `\t`, `\u001b`. */
export function printable(text: string): string {
  // eslint-disable-next-line no-control-regex
  return text.replace(/[\u0000-\u001f\u007f-\u009f]/g, (c) => {
    if (c === '\n') return '\\n';
    if (c === '\r') return '\\r';
    if (c === '\t') return '\\t';
    return `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`;
  });
}

/**
 * Text safe inside a Markdown table cell or paragraph: control characters escaped, `|` and the
 * characters that start inline markup backslash-escaped, and `>`; `<` only where it could open an
 * HTML tag, so `p < 0.05` stays readable.
 */
export function markdownText(text: string): string {
  return printable(text)
    .replace(/([\\`*_[\]|#])/g, '\\$1')
    .replace(/<(?=[A-Za-z/!?])/g, '\\<')
    .replace(/>/g, '\\>');
}

/** Display width of a string: code points (good enough for the names and numbers we print). */
function width(text: string): number {
  return [...text].length;
}

function pad(text: string, size: number, align: Align): string {
  const fill = ' '.repeat(Math.max(0, size - width(text)));
  return align === 'right' ? fill + text : text + fill;
}

/** An aligned plain-text table, indented by `indent` spaces; cells are made printable. */
export function textTable(headers: readonly string[], rows: readonly (readonly string[])[], align: readonly Align[], indent = 2): string {
  const cells = [headers, ...rows].map((row) => row.map(printable));
  const widths = headers.map((_, c) => Math.max(...cells.map((row) => width(row[c] ?? ''))));
  const lines = cells.map((row) =>
    ' '.repeat(indent) +
    row
      .map((cell, c) => pad(cell, widths[c]!, align[c] ?? 'left'))
      .join('  ')
      .trimEnd(),
  );
  return lines.join('\n');
}

/** A Markdown pipe table; cells are escaped. */
export function markdownTable(headers: readonly string[], rows: readonly (readonly string[])[], align: readonly Align[]): string {
  const line = (row: readonly string[]): string => `| ${row.map(markdownText).join(' | ')} |`;
  const rule = `|${headers.map((_, c) => (align[c] === 'right' ? '---:' : ':---')).join('|')}|`;
  return [line(headers), rule, ...rows.map(line)].join('\n');
}
