/**
 * Comparing runs on the demo notebook (a copy of its own, in a workspace of its own): three
 * cancellers on `reference`/`primary` overlaid by their spectra and their final weights'
 * responses, a plot's data written to the kernel and checked there against SciPy, the exports
 * read back from the downloaded files, and views opened in tabs of their own that close when
 * their run goes. Screenshots in the light and the dark theme.
 */
import fs from 'node:fs';
import type { Locator, Page } from 'playwright-core';
import { openDemoWorkbench } from './workbench-form';
import type { LabBrowser } from './browser';
import { palette, setTheme, runCell as runLabCell } from './lab-actions';

const ALLOW: RegExp[] = [/Canceled future for debug_request/];
const NOTEBOOK = 'compare-demo.ipynb';

let lab: LabBrowser;
let page: Page;

beforeAll(async () => {
  lab = await openDemoWorkbench(NOTEBOOK, 'perpend-compare');
  page = lab.page;
});

afterAll(async () => {
  await lab?.close();
});

function bench(): Locator {
  return page.locator('.pp-Workbench').first();
}

function field(p: string): Locator {
  return bench().locator(`.pp-Editor .pp-Field[data-path="${p}"]`);
}

function card(title: string): Locator {
  return bench().locator('.pp-SetupCard', { hasText: title });
}

function compare(): Locator {
  return bench().locator('.pp-Workbench-compare');
}

/** A canceller on reference → primary, saved and run until it ends well. */
async function canceller(title: string, algorithm: string, set: Record<string, string>) {
  await bench().locator('.pp-Workbench-tool[data-tool="adaptive"]').click();
  await bench().locator('.pp-Editor form').waitFor();
  await bench().locator('.pp-Editor-title').fill(title);
  await field('use').locator('select').first().selectOption('cancellation');
  for (const [p, name] of [
    ['x', 'reference'],
    ['d', 'primary']
  ]) {
    const select = field(p).locator('select').first();
    await select
      .locator(`option[value="v:${name}"]`)
      .waitFor({ state: 'attached', timeout: 90000 });
    await select.selectOption(`v:${name}`);
  }
  await field('algorithm').locator('select').first().selectOption(algorithm);
  for (const [p, v] of Object.entries(set)) {
    await field(p).locator('input').first().fill(v);
  }
  await bench().locator('.pp-Editor-foot button', { hasText: 'Save and run' }).click();
  await card(title).locator('.pp-RunRow[data-status="ok"]').first().waitFor({ timeout: 120000 });
}

/** The legend of the plot in `box`, once it names `entries` traces. */
async function legendOf(box: Locator, entries: number): Promise<string[]> {
  await box.locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  const legend = box.locator('.legend .traces');
  for (let i = 0; (await legend.count()) !== entries; i++) {
    if (i > 600) {
      throw new Error(`the legend has ${await legend.count()} entries, not ${entries}`);
    }
    await page.waitForTimeout(100);
  }
  return legend.allTextContents();
}

const runCell = (code: string, expect: RegExp, timeout = 60000): Promise<string> =>
  runLabCell(page, code, expect, timeout);

/** Clicks an export button of `box` and returns the downloaded file's name and bytes. */
async function download(box: Locator, label: string): Promise<{ name: string; bytes: Buffer }> {
  const [file] = await Promise.all([
    page.waitForEvent('download', { timeout: 30000 }),
    box.locator('.pp-PlotPane-export', { hasText: new RegExp(`^${label}$`) }).click()
  ]);
  const where = await file.path();
  return { name: file.suggestedFilename(), bytes: fs.readFileSync(where) };
}

/** Names the written variable in the dialog and waits for the outcome. */
async function nameAndWrite(name: string): Promise<void> {
  const input = page.locator('.jp-Dialog input');
  await input.waitFor();
  await input.fill(name);
  await page.locator('.jp-Dialog-button.jp-mod-accept').click();
  await page
    .locator('.Toastify__toast', { hasText: `as ${name}` })
    .first()
    .waitFor({ timeout: 30000 });
}

test('three runs overlaid by spectra and responses, light and dark', async () => {
  await canceller('QR-RLS canceller', 'qr-rls', { taps: '16', lambda: '0.999' });
  await canceller('NLMS canceller', 'nlms', { taps: '16', mu: '0.5' });
  await canceller('RLS short memory', 'rls', { taps: '8', lambda: '0.99' });
  for (const title of ['QR-RLS canceller', 'NLMS canceller', 'RLS short memory']) {
    await card(title).locator('.pp-RunRow-compare').first().check();
  }
  await compare().waitFor();
  const labels = ['QR-RLS · M 16 · λ 0.999', 'NLMS · M 16 · μ 0.5', 'RLS · M 8 · λ 0.99'];
  await compare().locator('.pp-Plots-tab[data-compare="spectrum"]').click();
  expect(await legendOf(compare(), 3)).toEqual(labels);
  expect(await compare().locator('.g-xtitle').textContent()).toBe('frequency (Hz)');
  expect(await compare().locator('.g-ytitle').textContent()).toBe('PSD (dB/Hz)');
  await compare().scrollIntoViewIfNeeded();
  await page.waitForTimeout(500);
  await lab.screenshot('compare-spectra-light');
  await compare().locator('.pp-Plots-tab[data-compare="response"]').click();
  // One legend entry per run (its phase curve below shares it).
  expect(await legendOf(compare(), 3)).toEqual(labels);
  expect(await compare().locator('.g-xtitle').textContent()).toBe('frequency (Hz)');
  expect(await compare().locator('.g-ytitle').textContent()).toBe('magnitude (dB)');
  expect(await compare().locator('.g-y2title').textContent()).toBe('phase (rad)');
  await compare().scrollIntoViewIfNeeded();
  await page.waitForTimeout(500);
  await lab.screenshot('compare-responses-light');
  await setTheme(page, 'JupyterLab Dark');
  await page.waitForTimeout(1500);
  await compare().scrollIntoViewIfNeeded();
  await lab.screenshot('compare-responses-dark');
  await compare().locator('.pp-Plots-tab[data-compare="spectrum"]').click();
  await legendOf(compare(), 3);
  await page.waitForTimeout(500);
  await lab.screenshot('compare-spectra-dark');
  await setTheme(page, 'JupyterLab Light');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test("the spectra's data written to the kernel equal SciPy's Welch of the error", async () => {
  // The run shown is the last one started (RLS, M 8): its error goes to the kernel first.
  await bench().locator('.pp-RunDetail-array[data-key="error"] button').click();
  await nameAndWrite('e_rls8');
  await compare().locator('.pp-PlotPane-export', { hasText: 'To kernel' }).click();
  await nameAndWrite('spectra_cmp');
  // scipy.signal.welch's defaults (Hann, 50 % overlap, constant detrend, density) with the
  // plots' 1024-sample segments; 10·log10 of its PSD against the written array.
  const out = await runCell(
    [
      'from scipy.signal import welch as sp_welch',
      'f_sp, p_sp = sp_welch(e_rls8, fs=fs, nperseg=1024)',
      "cols = spectra_cmp['params']['columns']",
      "k = [k for k, h in cols.items() if h.startswith('RLS · M 8') and 'PSD' in h][0]",
      "fk = [k for k, h in cols.items() if h.startswith('frequency') and 'RLS · M 8' in h][0]",
      "print('spectra-check', len(cols), spectra_cmp[k].shape, bool(np.allclose(spectra_cmp[fk], f_sp)),",
      '      float(np.max(np.abs(spectra_cmp[k] - 10 * np.log10(p_sp)))) < 1e-6)'
    ].join('\n'),
    /spectra-check/
  );
  expect(out).toContain('spectra-check 6 (513,) True True');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the exports read back: PNG signature, SVG root, CSV header with units and every row', async () => {
  await compare().locator('.pp-Plots-tab[data-compare="response"]').click();
  await legendOf(compare(), 3);
  const png = await download(compare(), 'PNG');
  expect(png.name).toMatch(/\.png$/);
  // PNG files begin with 89 50 4E 47 0D 0A 1A 0A (ISO/IEC 15948, PNG specification §5.2).
  expect([...png.bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  const svg = await download(compare(), 'SVG');
  expect(svg.name).toMatch(/\.svg$/);
  // The root element is <svg> in the SVG namespace (SVG 1.1, §5.1).
  const svgText = svg.bytes.toString('utf8');
  expect(svgText).toMatch(/^(<\?xml[^>]*>\s*)?<svg[^>]*xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
  expect(svgText).toContain('magnitude (dB)');
  const csv = await download(compare(), 'CSV');
  expect(csv.name).toBe('comparison-Weights-responses.csv');
  const lines = csv.bytes.toString('utf8').trimEnd().split('\r\n');
  // Each run: its frequency and magnitude, its frequency and phase; 513 frequencies (the
  // default 512 intervals over 0 … fs/2).
  const header = lines[0];
  expect(header.startsWith('frequency (Hz) · QR-RLS · M 16 · λ 0.999,')).toBe(true);
  expect(header).toContain('QR-RLS · M 16 · λ 0.999 · magnitude (dB)');
  expect(header.endsWith(',RLS · M 8 · λ 0.99 · phase (rad)')).toBe(true);
  expect(lines).toHaveLength(1 + 513);
  expect(lines[1].split(',')[0]).toBe('0');
  expect(lines[513].split(',')[0]).toBe('2000');
  expect(lines[200].split(',')).toHaveLength(12);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('a view and the comparison open in tabs of their own, and close with their run', async () => {
  await compare().locator('.pp-PlotPane-export', { hasText: 'Open in tab' }).click();
  const tab = page.locator('.pp-PlotTab:not(.lm-mod-hidden)');
  await tab.waitFor({ timeout: 30000 });
  expect(await legendOf(tab, 3)).toHaveLength(3);
  await page.waitForTimeout(500);
  await lab.screenshot('compare-tab-light');
  await setTheme(page, 'JupyterLab Dark');
  await page.waitForTimeout(1500);
  await lab.screenshot('compare-tab-dark');
  await setTheme(page, 'JupyterLab Light');
  // Back to the workbench: the run shown, its spectrum view, in a tab through the palette.
  await page.locator('.lm-DockPanel-tabBar .lm-TabBar-tab', { hasText: 'Workbench ·' }).click();
  const plots = bench().locator('.pp-Workbench-plots');
  await plots.locator('.pp-Plots-tab[data-view="spectrum"]').click();
  await plots.locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  await bench().click({ position: { x: 5, y: 5 } });
  await palette(page, 'Open Plot in a Tab');
  const runTab = page.locator('.lm-DockPanel-tabBar .lm-TabBar-tab', {
    hasText: 'Spectrum · RLS · M 8 · λ 0.99'
  });
  await runTab.waitFor({ timeout: 30000 });
  await page.locator('.pp-PlotTab:not(.lm-mod-hidden) .js-plotly-plot').waitFor();
  await page.waitForTimeout(500);
  await lab.screenshot('run-view-tab-light');
  // Removing the set-up takes its run away, and its tab with it; the comparison stays.
  await page.locator('.lm-DockPanel-tabBar .lm-TabBar-tab', { hasText: 'Workbench ·' }).click();
  await card('RLS short memory').locator('button', { hasText: 'Remove' }).click();
  await page.locator('.jp-Dialog-button.jp-mod-warn').click();
  await runTab.waitFor({ state: 'detached', timeout: 10000 });
  const compareTab = page.locator('.lm-DockPanel-tabBar .lm-TabBar-tab', {
    hasText: 'Comparison · Weights responses'
  });
  expect(await compareTab.count()).toBe(1);
  // Closing the workbench closes the tabs opened from it.
  await page
    .locator('.lm-DockPanel-tabBar .lm-TabBar-tab', { hasText: 'Workbench ·' })
    .locator('.lm-TabBar-tabCloseIcon')
    .click();
  await compareTab.waitFor({ state: 'detached', timeout: 10000 });
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});
