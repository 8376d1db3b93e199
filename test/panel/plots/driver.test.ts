// The plotly life cycle with a fake plotly (DESIGN §6): loaded once on the first draw, always
// Plotly.react, the envelope re-cut after a zoom (plotly_relayout), purge on dispose.
import { PlotDriver, relayoutRange } from '../../../src/panel/plots/plot-driver';
import { DEFAULT_PLOT_SETTINGS } from '../../../src/panel/plots/settings';
import { themeFrom } from '../../../src/panel/plots/theme';
import { buildView, DEFAULT_VIEW_OPTIONS } from '../../../src/panel/plots/views';
import { cancellationRun, FakePlotly, trans } from './fixtures';

const theme = themeFrom(() => '');
const size = { width: 600, height: 400 };

function setup(): {
  driver: PlotDriver;
  plotly: FakePlotly;
  loads: () => number;
  errors: unknown[];
} {
  const plotly = new FakePlotly();
  let loads = 0;
  const errors: unknown[] = [];
  const driver = new PlotDriver({
    node: {} as HTMLElement,
    loadPlotly: () => {
      loads++;
      return Promise.resolve(plotly);
    },
    settings: DEFAULT_PLOT_SETTINGS,
    onError: e => errors.push(e)
  });
  return { driver, plotly, loads: () => loads, errors };
}

const flush = (): Promise<void> => new Promise(r => setTimeout(r, 0));

test('relayout events: a range, autorange, or nothing for the x-axis', () => {
  expect(relayoutRange({ 'xaxis.range[0]': 1, 'xaxis.range[1]': 2 })).toEqual([1, 2]);
  expect(relayoutRange({ 'xaxis.range': [3, 4] })).toEqual([3, 4]);
  expect(relayoutRange({ 'xaxis.autorange': true })).toBeNull();
  expect(relayoutRange({ 'yaxis.range[0]': 1 })).toBeUndefined();
  expect(relayoutRange(null)).toBeUndefined();
  expect(relayoutRange({ 'yaxis2.range[0]': -1, 'yaxis2.range[1]': 1 }, 'yaxis2')).toEqual([-1, 1]);
});

test('nothing to draw loads nothing', async () => {
  const { driver, loads } = setup();
  await driver.draw(theme, size);
  expect(loads()).toBe(0);
});

test('a 200000-sample trace: decimated, then every sample after a zoom to 1000 samples', async () => {
  const { driver, plotly, loads, errors } = setup();
  const run = cancellationRun(200_000, null);
  driver.spec = buildView(trans, run, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
  await driver.draw(theme, size);
  await driver.draw(theme, size);
  expect(loads()).toBe(1);
  expect(plotly.reacts).toHaveLength(2);
  const cols = driver.columns;
  expect(cols).toBe(520); // (600 − 80 px of margins) · 4 points per pixel / 4 per column
  for (const t of plotly.last.data) {
    expect(t.type).toBe('scatter');
    expect((t.y as Float64Array).length).toBeLessThanOrEqual(4 * cols);
  }
  // the user zooms to samples 100000 … 100999
  plotly.handlers.get('plotly_relayout')?.({ 'xaxis.range[0]': 100000, 'xaxis.range[1]': 100999 });
  await flush();
  expect(plotly.reacts).toHaveLength(3);
  const err = plotly.last.data[2];
  const x = err.x as Float64Array;
  const y = err.y as Float64Array;
  expect(x.length).toBe(1002); // 1000 samples and one either side
  for (let k = 0; k < x.length; k++) {
    expect(x[k]).toBe(99999 + k);
    expect(y[k]).toBe(run.arrays.error.data[99999 + k]);
  }
  expect(driver.range).toEqual([100000, 100999]);
  // the CSV follows the zoom: every sample of the visible range
  expect(driver.csv().trimEnd().split('\r\n')).toHaveLength(1 + 1002);
  // double-click: back to the whole trace
  plotly.handlers.get('plotly_relayout')?.({ 'xaxis.autorange': true });
  await flush();
  expect((plotly.last.data[2].y as Float64Array).length).toBeLessThanOrEqual(4 * cols);
  expect(errors).toEqual([]);
}, 30000);

test('exports go through plotly; dispose purges and stops listening', async () => {
  const { driver, plotly } = setup();
  driver.spec = buildView(
    trans,
    cancellationRun(1000, 1000),
    'learning',
    DEFAULT_VIEW_OPTIONS,
    DEFAULT_PLOT_SETTINGS
  );
  await expect(driver.downloadImage('png', 'x')).rejects.toThrow('nothing is plotted yet');
  await driver.draw(theme, size);
  await driver.downloadImage('svg', 'curve');
  expect(plotly.images).toEqual([{ format: 'svg', filename: 'curve', width: 600, height: 400 }]);
  driver.dispose();
  expect(plotly.purged).toBe(1);
  expect(plotly.handlers.size).toBe(0);
  expect(driver.isDisposed).toBe(true);
  driver.dispose();
  expect(plotly.purged).toBe(1);
});

test('a y zoom is kept through later redraws until autorange', async () => {
  const { driver, plotly } = setup();
  driver.spec = buildView(
    trans,
    cancellationRun(5000, null),
    'signals',
    DEFAULT_VIEW_OPTIONS,
    DEFAULT_PLOT_SETTINGS
  );
  await driver.draw(theme, size);
  const fire = plotly.handlers.get('plotly_relayout');
  fire?.({
    'xaxis.range[0]': 100,
    'xaxis.range[1]': 200,
    'yaxis.range[0]': -0.5,
    'yaxis.range[1]': 0.5
  });
  await flush();
  await driver.draw(theme, { width: 700, height: 400 }); // a resize
  expect(plotly.last.layout.yaxis).toMatchObject({ range: [-0.5, 0.5], autorange: false });
  fire?.({ 'xaxis.autorange': true, 'yaxis.autorange': true });
  await flush();
  expect(plotly.last.layout.yaxis).toMatchObject({ autorange: true });
  expect((plotly.last.layout.yaxis as Record<string, unknown>).range).toBeUndefined();
});

test('a new spec resets the zoom; a redraw takes the latest size', async () => {
  const { driver, plotly } = setup();
  const run = cancellationRun(10000, null);
  driver.spec = buildView(trans, run, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
  await driver.draw(theme, size);
  await driver.zoom([10, 20]);
  expect(driver.range).toEqual([10, 20]);
  driver.spec = buildView(trans, run, 'learning', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
  expect(driver.range).toBeNull();
  const before = plotly.reacts.length;
  // two draws asked for at once conflate: only the latest reaches plotly
  await Promise.all([driver.draw(theme, size), driver.draw(theme, { width: 800, height: 300 })]);
  expect(plotly.reacts.length - before).toBe(1);
  expect(plotly.last.layout).toMatchObject({ width: 800, height: 300 });
});

test('the figure is built in one task and drawn after the page has had its turn', async () => {
  const plotly = new FakePlotly();
  const turns: Array<() => void> = [];
  const driver = new PlotDriver({
    node: {} as HTMLElement,
    loadPlotly: () => Promise.resolve(plotly),
    settings: DEFAULT_PLOT_SETTINGS,
    onError: () => undefined,
    yieldToPage: () => new Promise<void>(r => turns.push(r))
  });
  const run = cancellationRun(10000, null);
  driver.spec = buildView(trans, run, 'signals', DEFAULT_VIEW_OPTIONS, DEFAULT_PLOT_SETTINGS);
  const drawn = driver.draw(theme, size);
  await flush();
  expect(turns).toHaveLength(1);
  expect(plotly.reacts).toHaveLength(0); // built, not drawn yet
  turns.shift()?.();
  await drawn;
  expect(plotly.reacts).toHaveLength(1);
  // disposed while waiting for its turn: nothing reaches plotly
  const again = driver.draw(theme, size);
  await flush();
  driver.dispose();
  turns.shift()?.();
  await again;
  expect(plotly.reacts).toHaveLength(1);
});
