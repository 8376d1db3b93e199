/**
 * CSV of plotted data: the RFC 4180 text itself is made by ../../worker/jobs/csv-text (pure, so
 * the worker can make a long one off the page); headers with units and file names here.
 */

export { csvField, csvText, type CsvColumn } from '../../worker/jobs/csv-text';

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
