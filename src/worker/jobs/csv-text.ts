/**
 * CSV text of plotted data (RFC 4180: comma-separated, CRLF line ends, fields with a comma,
 * quote or line break quoted with doubled quotes). Numbers are written in full (shortest
 * round-trip form); a missing value is an empty field. Pure: used by the plots on the page for
 * small tables and by the worker's `csv` job for a plot's data at full resolution.
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

/** CSV of columns side by side; shorter columns leave their later fields empty. */
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
