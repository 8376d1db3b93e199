/**
 * Every view of the demo's kinds of run renders, in the light and the dark theme: a real noise
 * canceller on the 1e6-sample record (weights kept, so the tap trajectories show), a complex
 * predictor on the baseband capture, the QPSK equalizer (its constellation), the hum removal
 * (signals, spectrum, energy per harmonic) and a λ sweep. Each view's plot is drawn by plotly
 * with a title, no error is shown, and a screenshot of the plots pane is saved as
 * test-artifacts/screenshots/every-<run>-<view>-<theme>.png. On the long record a zoom by
 * dragging over the time axis re-decimates: zoomed to a few hundred samples, the trace holds
 * every sample of the range (consecutive times one sample period apart).
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import type { LabBrowser } from './browser';
import { SCREENSHOTS } from './browser';
import { palette, setTheme } from './lab-actions';
import { openDemoWorkbench, workbenchForm, type WorkbenchForm } from './workbench-form';

const NOTEBOOK = 'every-view-demo.ipynb';

let lab: LabBrowser;
let page: Page;

beforeAll(async () => {
  lab = await openDemoWorkbench(NOTEBOOK, 'perpend-every-view');
  page = lab.page;
  // The workbench alone in the main area (the plots get the room a user would give them): the
  // focus in the workbench first, so that the simple interface keeps it in front.
  await bench().locator('.pp-Workbench-lead').click();
  await palette(page, 'Simple Interface');
  await page.waitForFunction(
    () => document.getElementById('main')?.dataset.shellMode === 'single-document',
    undefined,
    { timeout: 10000 }
  );
  await bench().locator('.pp-Workbench-tool').first().waitFor({ state: 'visible', timeout: 10000 });
});

afterAll(async () => {
  await setTheme(page, 'JupyterLab Light');
  await lab?.close();
});

const form = (): WorkbenchForm => workbenchForm(page);
const bench = (): Locator => form().bench();
const plots = (): Locator => bench().locator('.pp-Workbench-plots');
const card = (title: string): Locator => form().card(title);
const newSetup = (tool: string, title: string) => form().newSetup(tool, title);
const pick = (p: string, name: string) => form().pick(p, name);
const type = (p: string, text: string) => form().type(p, text);
const choose = (p: string, value: string) => form().choose(p, value);
const saveAndRun = (title: string) => form().saveAndRun(title);

/** Waits for the set-up's newest run to end ok and shows it. */
async function showRun(title: string, count = 1): Promise<void> {
  const rows = card(title).locator('.pp-RunRow[data-status="ok"]');
  try {
    await rows.nth(count - 1).waitFor({ timeout: 180000 });
  } catch (e) {
    await lab.screenshot(`every-failed-${title.replace(/\W+/g, '-')}`);
    throw e;
  }
  await rows.first().click();
  await plots().locator('.pp-Plots-tab').first().waitFor({ timeout: 60000 });
}

/** The title plotly drew for the view on show, once it has drawn it. */
async function drawn(view: string): Promise<string> {
  await plots().locator(`.pp-Plots-tab[data-view="${view}"]`).click();
  await page.waitForFunction(
    v => {
      const tab = document.querySelector(`.pp-Workbench-plots .pp-Plots-tab[data-view="${v}"]`);
      const g = document.querySelector('.pp-Workbench-plots .js-plotly-plot .gtitle');
      return tab?.getAttribute('aria-selected') === 'true' && !!g && (g.textContent ?? '') !== '';
    },
    view,
    { timeout: 60000 }
  );
  // plotly finishes its layout (legend, annotations) just after the title
  await page.waitForTimeout(600);
  return (await plots().locator('.js-plotly-plot .gtitle').first().textContent()) ?? '';
}

/** Every view of the shown run, drawn and shot in both themes; returns view → title. */
async function everyView(name: string): Promise<Record<string, string>> {
  const views = await plots()
    .locator('.pp-Plots-tab')
    .evaluateAll(ts => ts.map(t => (t as HTMLElement).dataset.view ?? ''));
  const titles: Record<string, string> = {};
  for (const [theme, suffix] of [
    ['JupyterLab Light', 'light'],
    ['JupyterLab Dark', 'dark']
  ] as const) {
    await setTheme(page, theme);
    for (const v of views) {
      titles[v] = await drawn(v);
      const error = await plots().locator('.pp-PlotPane-status[data-kind="error"]').count();
      const text = error ? await plots().locator('.pp-PlotPane-status').first().textContent() : '';
      expect(`${v}: ${text}`).toBe(`${v}: `);
      // every axis of a line plot names its unit (or says it has none)
      fs.mkdirSync(SCREENSHOTS, { recursive: true });
      await plots().screenshot({
        path: path.join(SCREENSHOTS, `every-${name}-${v}-${suffix}.png`)
      });
    }
  }
  await setTheme(page, 'JupyterLab Light');
  return titles;
}

test('a real canceller on the long record: every view, and a zoom that shows every sample', async () => {
  await newSetup('adaptive', 'long canceller');
  await pick('x', 'long_reference');
  await pick('d', 'long_primary');
  await type('taps', '16');
  await type('keepEvery', '10000');
  await saveAndRun('long canceller');
  await showRun('long canceller');
  const titles = await everyView('canceller');
  expect(Object.keys(titles)).toEqual(
    expect.arrayContaining(['signals', 'learning', 'response', 'trajectories', 'spectrum'])
  );

  // Zoom: drag twice over a narrow band of the time axis of the signals view.
  await drawn('signals');
  const points = (): Promise<{ n: number; steps: number[] }> =>
    page.evaluate(() => {
      const gd = document.querySelector('.pp-Workbench-plots .js-plotly-plot') as unknown as {
        data: Array<{ x: ArrayLike<number> }>;
      };
      const x = Array.from(gd.data[0].x);
      const steps = x.slice(1).map((v, i) => v - x[i]);
      return { n: x.length, steps: [Math.min(...steps), Math.max(...steps)] };
    });
  const before = await points();
  for (let k = 0; k < 2; k++) {
    const box = (await plots().locator('.js-plotly-plot .nsewdrag').first().boundingBox())!;
    const y = box.y + box.height / 2;
    const x0 = box.x + box.width / 2;
    await page.mouse.move(x0, y);
    await page.mouse.down();
    await page.mouse.move(x0 + 6, y, { steps: 3 });
    await page.mouse.move(x0 + 12, y, { steps: 3 });
    await page.mouse.up();
    await page.waitForTimeout(800);
  }
  const after = await points();
  // 1e6 samples at fs = 4000 Hz: before, an envelope of a few points per pixel column; after
  // two zooms to about 2 % of the width each, a few hundred samples, every one drawn.
  expect(before.n).toBeLessThan(20000);
  expect(after.n).toBeGreaterThan(10);
  expect(after.n).toBeLessThan(before.n);
  expect(after.steps[0]).toBeCloseTo(1 / 4000, 12);
  expect(after.steps[1]).toBeCloseTo(1 / 4000, 12);
  await plots().screenshot({ path: path.join(SCREENSHOTS, 'every-canceller-zoomed-light.png') });
  expect(lab.unexpectedFaults()).toEqual([]);
});

test('a complex predictor on the baseband capture: every view', async () => {
  await newSetup('adaptive', 'baseband predictor');
  await choose('use', 'prediction');
  await pick('x', 'baseband');
  await choose('algorithm', 'rls');
  await type('taps', '8');
  await saveAndRun('baseband predictor');
  await showRun('baseband predictor');
  const titles = await everyView('complex');
  expect(Object.keys(titles)).toEqual(expect.arrayContaining(['signals', 'learning', 'spectrum']));
  // complex values: the switch offers magnitude/phase and real/imaginary parts
  await drawn('signals');
  expect(await plots().locator('.pp-Plots-controls select').first().locator('option').count()).toBe(
    2
  );
  expect(lab.unexpectedFaults()).toEqual([]);
});

test('the QPSK equalizer: every view, the constellation among them', async () => {
  await newSetup('adaptive', 'QPSK equalizer');
  await choose('use', 'equalization');
  await pick('x', 'received');
  await pick('d', 'symbols');
  await type('taps', '8');
  await saveAndRun('QPSK equalizer');
  await showRun('QPSK equalizer');
  const titles = await everyView('equalizer');
  expect(Object.keys(titles)).toContain('constellation');
  expect(lab.unexpectedFaults()).toEqual([]);
});

test('the hum removal: signals, spectrum and energy per harmonic', async () => {
  await newSetup('removal', 'hum off');
  await pick('signal', 'primary');
  await type('basis.count', '5');
  await saveAndRun('hum off');
  await showRun('hum off');
  const titles = await everyView('projection');
  expect(Object.keys(titles)).toEqual(expect.arrayContaining(['signals', 'spectrum', 'energy']));
  expect(lab.unexpectedFaults()).toEqual([]);
});

test('a λ sweep: every view of one of its runs', async () => {
  await newSetup('sweep', 'λ pair');
  await pick('base.x', 'reference');
  await pick('base.d', 'primary');
  await choose('parameter', 'lambda');
  await type('values', '0.99, 0.999');
  await saveAndRun('λ pair');
  await showRun('λ pair', 2);
  const titles = await everyView('sweep');
  expect(Object.keys(titles)).toEqual(expect.arrayContaining(['signals', 'learning']));
  expect(lab.unexpectedFaults()).toEqual([]);
});
