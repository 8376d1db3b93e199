// From a plot spec to plotly's data and layout, and the CSV of a visible range (RFC 4180).
import { csvField, csvText, fileStem, withUnit } from '../../../src/panel/plots/csv';
import {
  buildFigure,
  CsvTooLarge,
  figureCsv,
  legendRows,
  plotAreaWidth,
  withAlpha,
  wrapTitle
} from '../../../src/panel/plots/figure';
import { columnsFor, DEFAULT_PLOT_SETTINGS } from '../../../src/panel/plots/settings';
import { emptySpec, type PlotSpec } from '../../../src/panel/plots/spec';
import { COLOR_VARIABLES, themeFrom } from '../../../src/panel/plots/theme';
import { buildView, DEFAULT_VIEW_OPTIONS } from '../../../src/panel/plots/views';
import { cancellationRun, trans } from './fixtures';

const theme = themeFrom(() => '');

describe('CSV (RFC 4180)', () => {
  test('fields with commas, quotes or line breaks are quoted, quotes doubled', () => {
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\nlines')).toBe('"two\nlines"');
    expect(csvField(null)).toBe('');
    expect(csvField(0.1 + 0.2)).toBe('0.30000000000000004');
  });
  test('columns side by side, CRLF line ends, shorter columns left empty', () => {
    expect(
      csvText([
        { header: withUnit('time', 's'), values: [0, 0.5] },
        { header: 'e', values: [1] }
      ])
    ).toBe('time (s),e\r\n0,1\r\n0.5,\r\n');
  });
  test('file names keep letters, digits, dot, dash and underscore', () => {
    expect(fileStem('QR-RLS · M 16 · λ 0.999 Learning curve')).toBe(
      'QR-RLS-M-16-0.999-Learning-curve'
    );
    expect(fileStem('···')).toBe('plot');
  });
});

describe('figures', () => {
  const run = cancellationRun(100_000, 1000);
  const spec = buildView(trans, run, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);

  test('SVG scatter traces (never scattergl), at most 4 points per column', () => {
    const fig = buildFigure(spec, theme, null, 300, { width: 600, height: 400 });
    expect(fig.data).toHaveLength(3);
    for (const t of fig.data) {
      expect(t.type).toBe('scatter');
      expect((t.y as Float64Array).length).toBeLessThanOrEqual(1200);
    }
    expect(fig.layout).toMatchObject({ width: 600, height: 400 });
    expect((fig.layout.xaxis as { autorange: boolean }).autorange).toBe(true);
  });

  test('axis types are stated (numbers: linear; a bar chart of names: category), never guessed', () => {
    // plotly guesses a missing axis type by scanning every trace's data on each draw
    // (common practice to state it; measured in the page: 0.2–1.9 ms of a 10–12 ms draw).
    const l = buildView(trans, run, 'learning', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
    const fig = buildFigure(l, theme, null, 300, { width: 600, height: 400 });
    expect((fig.layout.xaxis as { type: string }).type).toBe('linear');
    expect((fig.layout.yaxis as { type: string }).type).toBe('linear');
    const bars: PlotSpec = {
      ...emptySpec('Energy per direction', 'direction', '', 'energy (dB)'),
      y2Title: 'share (%)',
      traces: [{ name: 'energy', kind: 'bar', x: ['50 Hz', '100 Hz'], y: [1, 2], color: 0 }]
    };
    const b = buildFigure(bars, theme, null, 300, { width: 600, height: 400 });
    expect((b.layout.xaxis as { type: string }).type).toBe('category');
    expect((b.layout.yaxis as { type: string }).type).toBe('linear');
    expect((b.layout.yaxis2 as { type: string }).type).toBe('linear');
  });

  test('a visible range is kept on the axis and re-cut from the samples', () => {
    const fig = buildFigure(spec, theme, [10, 10.2], 300, { width: 600, height: 400 });
    expect((fig.layout.xaxis as { range: number[] }).range).toEqual([10, 10.2]);
    // 0.2 s at 1 kHz: ~200 samples < 4·300, so every one is drawn (plus one either side)
    expect((fig.data[0].y as Float64Array).length).toBe(203);
  });

  test('marker lines and their labels become shapes and annotations', () => {
    const l = buildView(trans, run, 'learning', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
    const fig = buildFigure(l, theme, null, 300, { width: 600, height: 400 });
    const shapes = fig.layout.shapes as Array<Record<string, unknown>>;
    expect(shapes.map(s => [s.xref, s.yref])).toEqual([
      ['paper', 'y'],
      ['x', 'paper'],
      ['paper', 'y']
    ]);
    expect((fig.layout.annotations as Array<{ text: string }>).map(a => a.text)).toEqual([
      'steady state -21.5 dB',
      'converged at 0.5 s',
      'minimum MSE -20 dB'
    ]);
  });

  test('colours and fonts come from the theme variables', () => {
    const vars: Record<string, string> = {
      '--jp-ui-font-color1': '#fafafa',
      '--jp-layout-color1': '#111111',
      '--jp-ui-font-family': 'Inter',
      '--jp-ui-font-size1': '13px',
      [COLOR_VARIABLES[0]]: '#abcdef'
    };
    const dark = themeFrom(n => vars[n] ?? '');
    const fig = buildFigure(spec, dark, null, 300, { width: 600, height: 400 });
    expect(fig.layout.paper_bgcolor).toBe('#111111');
    expect(fig.layout.font).toEqual({ family: 'Inter', size: 13, color: '#fafafa' });
    expect((fig.data[0].line as { color: string }).color).toBe('#abcdef');
    expect(withAlpha('#abcdef', 0.5)).toBe('rgba(171,205,239,0.5)');
    expect(withAlpha('rgb(1, 2, 3)', 0.2)).toBe('rgba(1,2,3,0.2)');
  });

  test('the top margin makes room for a legend that wraps onto several rows', () => {
    const named = (n: number, len: number) =>
      Array.from({ length: n }, () => ({ name: 'x'.repeat(len) }));
    expect(legendRows(named(1, 10), 12, 600)).toBe(0); // one trace: no legend
    expect(legendRows(named(3, 10), 12, 600)).toBe(1);
    // 40 + 0.6·12·60 = 472 px each: one per row in 584 px
    expect(legendRows(named(3, 60), 12, 600)).toBe(3);
    expect(legendRows([{ name: 'a' }, { name: 'b', showlegend: false }], 12, 600)).toBe(0);
  });

  test('the point budget: columns of the plot area for a number of points per pixel', () => {
    expect(plotAreaWidth(600)).toBe(520);
    expect(columnsFor(520, 4)).toBe(520);
    expect(columnsFor(520, 2)).toBe(260);
    expect(columnsFor(10, 4)).toBe(16);
  });
});

describe('titles', () => {
  test('a title wider than the plot is broken at spaces, every word kept; a short one is not', () => {
    const long = 'Learning curves, smoothed over 640 samples';
    const narrow = wrapTitle(long, 14, 220);
    expect(narrow.lines).toBeGreaterThan(1);
    expect(narrow.text.split('<br>').join(' ')).toBe(long);
    for (const line of narrow.text.split('<br>')) {
      expect(line.length).toBeLessThanOrEqual(Math.floor((220 - 16) / (0.6 * 14)));
    }
    expect(wrapTitle(long, 14, 1000)).toEqual({ text: long, lines: 1 });
    // a single word longer than the line stays whole
    expect(wrapTitle('x'.repeat(50), 14, 100)).toEqual({ text: 'x'.repeat(50), lines: 1 });
  });
});

describe('CSV of the visible range', () => {
  const run = cancellationRun(100_000, 1000);
  const spec = buildView(trans, run, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);

  test('every sample of the range, one time column shared', () => {
    const text = figureCsv(spec, [1, 1.01], 1000);
    const lines = text.trimEnd().split('\r\n');
    expect(lines[0]).toBe('time (s),primary d(n),output y(n),error e(n)');
    expect(lines).toHaveLength(1 + 13);
    const [t, d, y, e] = lines[1].split(',').map(Number);
    const i = Math.round(t * 1000);
    expect(i).toBe(999);
    expect(d).toBe(run.inputs.d.data[i]);
    expect(y).toBe(run.arrays.output.data[i]);
    expect(e).toBe(run.arrays.error.data[i]);
  });

  test('past the row limit it refuses with what to do', () => {
    expect(() => figureCsv(spec, null, 1000)).toThrow(CsvTooLarge);
    expect(() => figureCsv(spec, null, 1000)).toThrow(
      'The visible range holds 100000 samples of "primary d(n)"; an export takes at most 1000 rows. Zoom in first.'
    );
  });

  test('short traces: the points inside the range', () => {
    const s: PlotSpec = {
      title: 't',
      xTitle: 'frequency (Hz)',
      xUnit: 'Hz',
      yTitle: 'PSD (dB/Hz)',
      lines: [],
      markers: [],
      traces: [{ name: 'after', kind: 'line', x: [0, 10, 20, 30], y: [1, 2, 3, 4], color: 0 }]
    };
    expect(figureCsv(s, [5, 25], 10)).toBe(
      'frequency (Hz) · after,after · PSD (dB/Hz)\r\n10,2\r\n20,3\r\n'
    );
  });
});

describe('a heatmap (spectrogram)', () => {
  const spec: PlotSpec = {
    ...{ title: 'S', xTitle: 'time (s)', xUnit: 's', yTitle: 'frequency (Hz)' },
    lines: [],
    traces: [],
    markers: [],
    heatmap: {
      name: 'x',
      x: Float64Array.from([0.5, 1.5, 2.5]),
      y: Float64Array.from([0, 10]),
      z: Float64Array.from([1, 2, 3, 4, 5, 6]),
      rows: 2,
      cols: 3,
      zTitle: 'power (dB/Hz)',
      zRange: [-80, 6]
    }
  };
  test('z as rows, the colour range fixed, the colour bar titled with the unit', () => {
    const f = buildFigure(spec, theme, null, 100, { width: 600, height: 300 });
    const h = f.data[0];
    expect(h.type).toBe('heatmap');
    expect((h.z as Float64Array[]).map(r => Array.from(r))).toEqual([
      [1, 2, 3],
      [4, 5, 6]
    ]);
    expect([h.zmin, h.zmax]).toEqual([-80, 6]);
    expect((h.colorbar as { title: { text: string } }).title.text).toBe('power (dB/Hz)');
    expect((f.layout.margin as { r: number }).r).toBeGreaterThan(60);
    expect(h.hovertemplate).toBe(
      'time (s) %{x}<br>frequency (Hz) %{y}<br>power (dB/Hz) %{z:.1f}<extra></extra>'
    );
  });
  test('CSV: one row per cell inside the visible range, and the row limit', () => {
    const csv = figureCsv(spec, [1, 3], 100);
    expect(csv).toBe(
      'time (s),frequency (Hz),power (dB/Hz)\r\n1.5,0,2\r\n1.5,10,5\r\n2.5,0,3\r\n2.5,10,6\r\n'
    );
    expect(() => figureCsv(spec, null, 5)).toThrow(CsvTooLarge);
  });
});
