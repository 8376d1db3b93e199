/** The `csv` job: a plot's data as UTF-8 CSV text, made off the page (see csv-text.ts). */
import type { CsvJobResult, CsvSpec } from '../protocol';
import type { JobContext } from './context';
import { csvText } from './csv-text';

export async function runCsv(spec: CsvSpec, ctx: JobContext): Promise<CsvJobResult> {
  if (!Array.isArray(spec.columns)) {
    throw new TypeError('columns must be a list of { header, values }');
  }
  const columns = spec.columns.map((c, i) => {
    if (typeof c?.header !== 'string') {
      throw new TypeError(`column ${i + 1} needs a header (a string)`);
    }
    if (!(c.values instanceof Float64Array) && !Array.isArray(c.values)) {
      throw new TypeError(
        `column ${i + 1} (${c.header}) needs its values as a list or a Float64Array`
      );
    }
    return c.values instanceof Float64Array
      ? // NaN marks a missing value in a numeric column: an empty field
        { header: c.header, values: Array.from(c.values, v => (Number.isNaN(v) ? null : v)) }
      : { header: c.header, values: c.values };
  });
  await ctx.checkpoint(0, 1, 'csv');
  const text = csvText(columns);
  const rows = columns.reduce((m, c) => Math.max(m, c.values.length), 0);
  return { kind: 'csv', status: 'ok', warnings: [], bytes: new TextEncoder().encode(text), rows };
}
