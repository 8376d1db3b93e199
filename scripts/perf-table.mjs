// Turns the JSON lines of a benchmark (`npm run -s bench:NAME -- --json`) into the Markdown table
// of the README's Performance section.
// Usage: npm run -s bench:filters -- --json | node scripts/perf-table.mjs filters
//        node scripts/perf-table.mjs linalg < saved.jsonl
import fs from 'node:fs';

const kind = process.argv[2];
const lines = fs
  .readFileSync(0, 'utf8')
  .split('\n')
  .filter(l => l.startsWith('{'))
  .map(l => JSON.parse(l))
  .filter(r => r.name);

const cell = v => (v === undefined || v === null ? '' : String(v));
const withMin = (v, m) => (v === undefined ? '' : m === undefined ? String(v) : `${v} (${m})`);
const targets = r =>
  r.targets
    ? Object.entries(r.targets)
        .map(([k, v]) => `${k} ≥ ${v.target}: ${v.met ? 'met' : '**missed**'}`)
        .join(' ')
    : '';

function print(head, rows) {
  console.log(`| ${head.join(' | ')} |`);
  console.log(`|${head.map(() => '---').join('|')}|`);
  for (const r of rows) {
    console.log(`| ${r.join(' | ')} |`);
  }
}

if (kind === 'filters') {
  print(
    [
      'algorithm',
      'cx',
      'precision',
      'M',
      'samples',
      'ksps',
      'GFLOP/s',
      '×np RLS',
      '×np QR-RLS',
      'complex/real',
      'float32/float64',
      'targets'
    ],
    lines.map(r => [
      r.name.replace('filters.', ''),
      r.complex ? 'complex' : 'real',
      r.precision,
      cell(r.M),
      cell(r.samples),
      cell(r.perpend_ksps),
      cell(r.gflops),
      cell(r.ratio_vs_numpy_rls),
      cell(r.ratio_vs_numpy_qrrls),
      cell(r.complex_vs_real),
      cell(r.float32_vs_float64),
      targets(r)
    ])
  );
} else if (kind === 'linalg') {
  const met = v => (v === undefined ? '' : v ? 'met' : '**missed**');
  print(
    [
      'case',
      'size',
      'dtype',
      'Perpend ms (min)',
      'GFLOP/s',
      'ml-matrix ms',
      '× faster than ml-matrix',
      'LAPACK ms (min)',
      'LAPACK GFLOP/s',
      'ratio (min)',
      'target',
      'met',
      'met (min)'
    ],
    lines.map(r => [
      r.name,
      r.size,
      r.dtype,
      withMin(r.perpend_ms, r.perpend_min_ms),
      cell(r.perpend_gflops),
      cell(r.mlmatrix_ms),
      cell(r.speedup_vs_mlmatrix),
      withMin(r.lapack_ms, r.lapack_min_ms),
      cell(r.lapack_gflops),
      r.ratio !== undefined
        ? `${r.ratio} (${cell(r.ratio_min)})`
        : r.ratio_vs_lapack !== undefined
          ? `${r.ratio_vs_lapack} (${cell(r.ratio_vs_lapack_min)})`
          : '',
      cell(r.target),
      met(r.met),
      met(r.met_on_min)
    ])
  );
} else {
  console.error('usage: node scripts/perf-table.mjs filters|linalg < jsonl');
}
process.exit(0);
