/**
 * A plot's data as a record for the kernel: the columns the CSV export holds (full resolution,
 * the visible range) as float64 arrays, each under a Python identifier made from its header,
 * and beside them the plot's title, the visible range and each key's header with its unit.
 * Text columns (the categories of a bar chart) go into the parameters as lists.
 */
import type { ArrayData } from '../../bridge';
import { PYTHON_KEYWORDS } from '../../bridge/names';
import type { CsvColumn } from './csv';
import type { XRange } from './lines';

export interface PlotRecord {
  /** The arrays, by key (Python identifiers, none of them "params"). */
  arrays: Record<string, ArrayData>;
  /** JSON beside them: title, axes, range, headers by key, text columns. */
  params: {
    title: string;
    x_title: string;
    y_title: string;
    y2_title: string | null;
    /** The visible x-range exported, null for all of it. */
    x_range: [number, number] | null;
    /** Each key's column header (name and unit), in the order of the columns. */
    columns: Record<string, string>;
    /** Text columns by key (categories). */
    labels: Record<string, string[]>;
  };
}

/**
 * A Python identifier from a header: ASCII letters, digits and '_' (every other run of
 * characters becomes one '_'), not starting with a digit, not a keyword, not "params", at most
 * 60 characters; `taken` keys get a numbered suffix.
 */
export function columnKey(header: string, taken: ReadonlySet<string>): string {
  let base = header
    .normalize('NFKD')
    .replace(/[^A-Za-z0-9]+/g, '_')
    .replace(/^_+|_+$/g, '')
    .slice(0, 60)
    .replace(/_+$/, '');
  if (base === '' || /^[0-9]/.test(base)) {
    base = `c_${base}`.replace(/_+$/, '');
  }
  if (PYTHON_KEYWORDS.has(base) || base === 'params') {
    base = `${base}_`;
  }
  let key = base;
  for (let k = 2; taken.has(key); k++) {
    key = `${base}_${k}`;
  }
  return key;
}

/** The record of a plot's columns (see `plotColumns`). */
export function plotRecord(
  columns: ReadonlyArray<CsvColumn>,
  about: { title: string; xTitle: string; yTitle: string; y2Title?: string; range: XRange }
): PlotRecord {
  const arrays: Record<string, ArrayData> = {};
  const headers: Record<string, string> = {};
  const labels: Record<string, string[]> = {};
  const taken = new Set<string>();
  for (const c of columns) {
    const key = columnKey(c.header, taken);
    taken.add(key);
    headers[key] = c.header;
    const v = c.values;
    if (v.length > 0 && typeof v[0] === 'string') {
      labels[key] = Array.from(v as ArrayLike<string>, String);
      continue;
    }
    const data = new Float64Array(v.length);
    for (let i = 0; i < v.length; i++) {
      const x = v[i];
      data[i] = typeof x === 'number' ? x : NaN;
    }
    arrays[key] = { data, shape: [data.length], complex: false, dtype: 'float64' };
  }
  return {
    arrays,
    params: {
      title: about.title,
      x_title: about.xTitle,
      y_title: about.yTitle,
      y2_title: about.y2Title ?? null,
      x_range: about.range ? [about.range[0], about.range[1]] : null,
      columns: headers,
      labels
    }
  };
}
