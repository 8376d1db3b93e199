/**
 * CSV text of plotted data (RFC 4180: comma-separated, CRLF line ends, fields with a comma,
 * quote or line break quoted with doubled quotes). Numbers are written in full (shortest
 * round-trip form); a missing value is an empty field.
 */

/** One column: its header (name and unit) and values. */
export interface CsvColumn {
  header: string;
  values: ArrayLike<number | null> | ReadonlyArray<string | number | null>;
}

/** A field as RFC 4180 wants it. */
export function csvField(v: string | number | null | undefined): string {
  if (v === null || v === undefined) {
    return '';
  }
  const s = typeof v === 'number' ? String(v) : v;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/**
 * CSV of columns side by side; shorter columns leave their later fields empty.
 */
export function csvText(columns: ReadonlyArray<CsvColumn>): string {
  const rows = columns.reduce((m, c) => Math.max(m, c.values.length), 0);
  const lines: string[] = [columns.map(c => csvField(c.header)).join(',')];
  for (let i = 0; i < rows; i++) {
    lines.push(
      columns
        .map(c => csvField(i < c.values.length ? (c.values[i] as string | number | null) : null))
        .join(',')
    );
  }
  return lines.join('\r\n') + '\r\n';
}

/** A header with its unit in parentheses ("time (s)"), or the name alone for no unit. */
export function withUnit(name: string, unit: string): string {
  return unit ? `${name} (${unit})` : name;
}

/** A file name from a label: letters, digits, '-', '_' and '.', at most 80 characters. */
export function fileStem(label: string): string {
  const s = label
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9._-]+/g, '-')
    .replace(/-+/g, '-')
    .replace(/^-|-$/g, '');
  return (s || 'plot').slice(0, 80);
}
