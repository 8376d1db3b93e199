/**
 * The plot views of issue 11 on the demo notebook (a copy of its own): a noise canceller run
 * against the demo's true 12-tap path (weights response with the true response, the
 * cancellation bound, the spectrogram) and the jammer removal on the 8-element array (beam
 * pattern). Each view is drawn in JupyterLab's light and dark themes and saved as a screenshot
 * of the plots in test-artifacts/screenshots/views-*.png.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import type { LabBrowser } from './browser';
import { SCREENSHOTS } from './browser';
import { palette, setTheme } from './lab-actions';
import { openDemoWorkbench, workbenchForm, type WorkbenchForm } from './workbench-form';

const NOTEBOOK = 'views-demo.ipynb';

let lab: LabBrowser;
let page: Page;

beforeAll(async () => {
  lab = await openDemoWorkbench(NOTEBOOK, 'perpend-views');
  page = lab.page;
});

afterAll(async () => {
  await setTheme(page, 'JupyterLab Light');
  await lab?.close();
});

function bench(): Locator {
  return page.locator('.pp-Workbench').first();
}

const form = (): WorkbenchForm => workbenchForm(page);
const field = (p: string): Locator => form().field(p);
const card = (title: string): Locator => form().card(title);
const newSetup = (tool: string, title: string) => form().newSetup(tool, title);
const pick = (p: string, name: string) => form().pick(p, name);
const type = (p: string, text: string) => form().type(p, text);

async function ended(title: string): Promise<void> {
  const row = card(title).locator('.pp-RunRow[data-status="ok"]').first();
  try {
    await row.waitFor({ timeout: 120000 });
  } catch (e) {
    await lab.screenshot(`views-failed-${title.replace(/\W+/g, '-')}`);
    throw e;
  }
  await row.click();
}

async function figure(key: string): Promise<number> {
  const cell = bench().locator(`.pp-RunDetail-figures tr[data-key="${key}"] td`).first();
  return Number(((await cell.textContent()) ?? '').replace('−', '-'));
}

function plots(): Locator {
  return bench().locator('.pp-Workbench-plots');
}

/** Opens a view's tab and waits until plotly has drawn it with the view's title. */
async function show(view: string, title: RegExp): Promise<void> {
  await plots().locator(`.pp-Plots-tab[data-view="${view}"]`).click();
  await page.waitForFunction(
    t => {
      const g = document.querySelector('.pp-Workbench-plots .js-plotly-plot .gtitle');
      return !!g && new RegExp(t).test(g.textContent ?? '');
    },
    title.source,
    { timeout: 60000 }
  );
  // plotly finishes its layout (colour bar, annotations) just after the title.
  await page.waitForTimeout(700);
}

/** The workbench alone in the main area (JupyterLab's simple interface), or side by side again. */
async function alone(on: boolean): Promise<void> {
  const simple = await page.evaluate(
    () => document.getElementById('main')?.dataset.shellMode === 'single-document'
  );
  if (simple !== on) {
    // Focus in the workbench, so that the simple interface keeps it in front.
    await plots().locator('.pp-Plots-tab[aria-selected="true"]').click();
    await palette(page, 'Simple Interface');
    await page.waitForFunction(
      want => (document.getElementById('main')?.dataset.shellMode === 'single-document') === want,
      on,
      { timeout: 10000 }
    );
    await page.waitForTimeout(500);
  }
}

/** Screenshots of the plots pane in the light and the dark theme. */
async function shoot(name: string, view: string, title: RegExp): Promise<void> {
  await alone(true);
  for (const [theme, suffix] of [
    ['JupyterLab Light', 'light'],
    ['JupyterLab Dark', 'dark']
  ] as const) {
    await setTheme(page, theme);
    await show(view, title);
    await plots().scrollIntoViewIfNeeded();
    fs.mkdirSync(SCREENSHOTS, { recursive: true });
    await plots().screenshot({ path: path.join(SCREENSHOTS, `views-${name}-${suffix}.png`) });
  }
  await setTheme(page, 'JupyterLab Light');
  await alone(false);
}

test('noise cancellation against the true path: response, cancellation bound, spectrogram', async () => {
  await newSetup('adaptive', 'motor path known');
  await pick('x', 'reference');
  await pick('d', 'primary');
  await bench().locator('.pp-Editor-more summary').click();
  // None is chosen at first: the true response is optional.
  expect(await field('truth').locator('select').inputValue()).toBe('');
  await pick('truth', 'path');
  await bench().locator('.pp-Editor-foot button', { hasText: 'Save and run' }).click();
  await ended('motor path known');
  // QR-RLS with M = 16 ≥ 12 taps: the weights come close to the 12-tap path (the hum and the
  // bearing tone in d are not correlated with x and only perturb them).
  const mis = await figure('misalignmentDb');
  expect(mis).toBeLessThan(-15);
  await bench().locator('.pp-RunDetail-params summary').click();
  await expect(bench().locator('.pp-RunDetail-params').textContent()).resolves.toMatch(
    /true response\s*path · 12/
  );
  await plots().locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  expect(await plots().locator('.pp-Plots-tab').allTextContents()).toEqual(
    expect.arrayContaining(['Weights response', 'Cancellation bound', 'Spectrogram'])
  );
  await shoot('response-truth', 'response', /Response of the final weights/);
  const legend = (await plots().locator('.legend').textContent()) ?? '';
  expect(legend).toContain('|H| true');
  await shoot('cancellation-bound', 'cancellation', /Cancellation: bound/);
  const note = (await plots().locator('.pp-PlotPane-note').first().textContent()) ?? '';
  expect(note).toMatch(/magnitude-squared coherence of the reference x and the primary d/);
  await shoot('spectrogram-before', 'spectrogram', /Spectrogram of primary d\(n\)/);
  await plots().locator('select.pp-Plots-signal').selectOption('after');
  await shoot('spectrogram-after', 'spectrogram', /Spectrogram of error e\(n\)/);
  expect(await plots().locator('.js-plotly-plot .colorbar').count()).toBe(1);
  expect(lab.unexpectedFaults()).toEqual([]);
});

test('jammer removal on the 8-element array: the beam pattern has its null at 35°', async () => {
  await newSetup('removal', 'jammer off');
  await pick('signal', 'sensors');
  await field('signal').locator('select.pp-Field-layout').selectOption('1:channels');
  await field('basis.kind').locator('select').selectOption('array');
  await type('basis.directions', '35');
  await type('basis.spacing', '0.5');
  await type('basis.wavelength', '1');
  await bench().locator('.pp-Editor-foot button', { hasText: 'Save and run' }).click();
  await ended('jammer off');
  await plots().locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  await shoot('beam-pattern', 'beam', /Beam pattern of the projection/);
  const text = (await plots().textContent()) ?? '';
  expect(text).toContain('8-element line array with spacing d/λ = 0.5');
  expect(text).toContain('removed 35°');
  expect(lab.unexpectedFaults()).toEqual([]);
});
