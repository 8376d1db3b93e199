/**
 * The workbench as an engineer uses it on the demo notebook (a copy of its own, so the other
 * browser tests see the demo as shipped): noise cancellation written back and checked against a
 * numpy recomputation, hum removal checked at the harmonic lines, a sweep beside NLMS, a long run
 * cancelled and re-run, set-ups kept across a reload, a mistyped form, a set-up that follows its
 * source, and a kernel restart during a run. Each journey leaves a screenshot.
 */
import type { Locator, Page } from 'playwright-core';
import { openDemoWorkbench } from './workbench-form';
import type { LabBrowser } from './browser';
import {
  menu,
  palette,
  setTheme,
  textContrast,
  waitNotebookReady,
  runCell as runLabCell
} from './lab-actions';

// JupyterLab's own debugger says this when a kernel restarts under it (not Perpend's).
const ALLOW: RegExp[] = [/Canceled future for debug_request/];
const NOTEBOOK = 'workbench-demo.ipynb';

let lab: LabBrowser;
let page: Page;

beforeAll(async () => {
  lab = await openDemoWorkbench(NOTEBOOK, 'perpend-workbench');
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

/** Starts a new set-up of `tool` and waits for its form. */
async function newSetup(tool: string, title: string): Promise<void> {
  await bench().locator(`.pp-Workbench-tool[data-tool="${tool}"]`).click();
  await bench().locator('.pp-Editor form').waitFor();
  await bench().locator('.pp-Editor-title').fill(title);
}

/** Picks a listed array for a source field (waits until the kernel lists it). */
async function pick(p: string, name: string): Promise<void> {
  const select = field(p).locator('select').first();
  await select.locator(`option[value="v:${name}"]`).waitFor({ state: 'attached', timeout: 90000 });
  await select.selectOption(`v:${name}`);
}

async function choose(p: string, value: string): Promise<void> {
  await field(p).locator('select').first().selectOption(value);
}

async function type(p: string, text: string): Promise<void> {
  await field(p).locator('input').first().fill(text);
}

async function saveAndRun(): Promise<void> {
  await bench().locator('.pp-Editor-foot button', { hasText: 'Save and run' }).click();
}

function card(title: string): Locator {
  return bench().locator('.pp-SetupCard', { hasText: title });
}

/** The newest run of a set-up, once it has ended with `status`. */
async function ended(title: string, status = 'ok', timeout = 120000): Promise<Locator> {
  const row = card(title).locator(`.pp-RunRow`).first();
  await card(title).locator(`.pp-RunRow[data-status="${status}"]`).first().waitFor({ timeout });
  return row;
}

async function figure(key: string): Promise<number> {
  const cell = bench().locator(`.pp-RunDetail-figures tr[data-key="${key}"] td`).first();
  const text = (await cell.textContent()) ?? '';
  return Number(text.replace('−', '-'));
}

const runCell = (code: string, expect: RegExp, timeout = 60000): Promise<string> =>
  runLabCell(page, code, expect, timeout);

async function writeBack(key: string, name: string): Promise<void> {
  await bench().locator(`.pp-RunDetail-array[data-key="${key}"] button`).click();
  const input = page.locator('.jp-Dialog input');
  await input.waitFor();
  await input.fill(name);
  await page.locator('.jp-Dialog-button.jp-mod-accept').click();
  await page
    .locator('.Toastify__toast', { hasText: `as ${name}` })
    .first()
    .waitFor({ timeout: 30000 });
}

test('(a) noise cancellation with QR-RLS, the error written back and checked in numpy', async () => {
  await newSetup('adaptive', 'motor noise, QR-RLS');
  await choose('use', 'cancellation');
  await pick('x', 'reference');
  await pick('d', 'primary');
  await type('taps', '16');
  await type('lambda', '0.999');
  await saveAndRun();
  const row = await ended('motor noise, QR-RLS');
  await row.click();
  expect(await figure('steadyStateMseDb')).toBeLessThan(-3);
  await lab.screenshot('workbench-a-cancellation');
  // The run's plots under its numbers (plotly loaded on this first plot).
  const plots = bench().locator('.pp-Workbench-plots');
  await plots.locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  await plots.scrollIntoViewIfNeeded();
  await page.waitForTimeout(500);
  await lab.screenshot('workbench-a-plots');
  await writeBack('error', 'e_qr');
  // Conventional RLS in numpy with the same initialisation (P(0) = I/δ, w(0) = 0) gives the
  // same a-priori errors as QR-RLS up to rounding (Haykin, Adaptive Filter Theory, 4th ed.,
  // ch. 13: QR-RLS computes the exponentially weighted least-squares solution exactly).
  const out = await runCell(
    [
      'M, lam, delta = 16, 0.999, 0.01',
      'P = np.eye(M) / delta; w = np.zeros(M); u = np.zeros(M); e_np = np.empty(n_samples)',
      'for n in range(n_samples):',
      '    u[1:] = u[:-1]; u[0] = reference[n]',
      '    Pu = P @ u; k = Pu / (lam + u @ Pu)',
      '    e_np[n] = primary[n] - w @ u; w = w + k * e_np[n]',
      '    P = (P - np.outer(k, Pu)) / lam; P = (P + P.T) / 2',
      "print('rls-check', e_qr.shape, float(np.max(np.abs(e_qr - e_np)) / np.max(np.abs(primary))) < 1e-8)"
    ].join('\n'),
    /rls-check/,
    120000
  );
  expect(out).toContain('rls-check (32000,) True');
  // The whole run at once: one dict of its arrays and its parameters.
  await bench().locator('.pp-RunDetail-arrays button', { hasText: 'Write the whole run' }).click();
  const input = page.locator('.jp-Dialog input');
  await input.waitFor();
  await input.fill('run_qr');
  await page.locator('.jp-Dialog-button.jp-mod-accept').click();
  await page
    .locator('.Toastify__toast', { hasText: 'as run_qr' })
    .first()
    .waitFor({ timeout: 30000 });
  // The smoothed learning curve the run carries is the trailing moving average over the
  // figures' window (min(1024, N/50) = 640 samples here), recomputed in numpy from cumulative sums.
  const record = await runCell(
    [
      "lc, sm, W = run_qr['learningCurve'], run_qr['learningCurveSmoothed'], 640",
      'c = np.cumsum(lc); ref = np.empty_like(lc); ref[:W] = c[:W] / np.arange(1, W + 1)',
      'ref[W:] = (c[W:] - c[:-W]) / W',
      "print('record-check', all(k in run_qr for k in ('error', 'output', 'weights', 'learningCurve')), run_qr['params']['setup']['taps'], bool(np.array_equal(run_qr['error'], e_qr)), float(np.max(np.abs(sm - ref)) / np.max(ref)) < 1e-9)"
    ].join('\n'),
    /record-check/
  );
  expect(record).toContain('record-check True 16 True True');
  await lab.screenshot('workbench-a-checked');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(b) hum removal: the harmonic lines fall by 40 dB, the bearing tone keeps 99 %', async () => {
  await newSetup('removal', 'mains hum');
  await pick('signal', 'primary');
  // f0 and fs come prefilled from the kernel's f0 = 50 and fs.
  expect(await field('basis.f0').locator('input').inputValue()).toBe('50');
  expect(await field('basis.fs').locator('input').inputValue()).toBe('fs');
  await type('basis.count', '5');
  await saveAndRun();
  const row = await ended('mains hum');
  await row.click();
  // Each harmonic's share from least squares on its own pair: the demo's hum amplitudes are
  // 0.8/k, so 50 Hz carries the most and 250 Hz the least.
  const shares = [];
  for (const f of [50, 100, 150, 200, 250]) {
    shares.push(await figure(`dir:${f} Hz`));
  }
  expect([...shares].sort((a, b) => b - a)).toEqual(shares);
  await lab.screenshot('workbench-b-hum');
  await writeBack('output', 'primary_clean');
  // DFT bins: 32000 samples at 4000 Hz put k·50 Hz on bin 400·k and 737 Hz on bin 5896 exactly.
  const out = await runCell(
    [
      'X, Y = np.fft.rfft(primary), np.fft.rfft(primary_clean)',
      'drop = [10*np.log10(abs(X[400*k])**2 / abs(Y[400*k])**2) for k in range(1, 6)]',
      'kept = abs(Y[5896])**2 / abs(X[5896])**2',
      "print('hum-check', min(drop) >= 40, kept >= 0.99, round(min(drop), 1), round(kept, 4))"
    ].join('\n'),
    /hum-check/
  );
  expect(out).toMatch(/hum-check True True/);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(c) a λ sweep of three values beside NLMS on the same data, all runs listed', async () => {
  await newSetup('sweep', 'λ sweep');
  await pick('base.x', 'reference');
  await pick('base.d', 'primary');
  await choose('parameter', 'lambda');
  await type('values', '0.99, 0.995, 0.999');
  await saveAndRun();
  await newSetup('adaptive', 'NLMS for comparison');
  await pick('x', 'reference');
  await pick('d', 'primary');
  await choose('algorithm', 'nlms');
  await type('mu', '0.5');
  await saveAndRun();
  await ended('NLMS for comparison');
  const rows = card('λ sweep').locator('.pp-RunRow[data-status="ok"]');
  await rows.nth(2).waitFor({ timeout: 120000 });
  const labels = await card('λ sweep').locator('.pp-RunRow-label').allTextContents();
  // Compare the three: learning curves overlaid and the table beside them, in both themes.
  for (const row of await card('λ sweep').locator('.pp-RunRow-compare').all()) {
    await row.check();
  }
  const compare = bench().locator('.pp-Workbench-compare');
  await compare.waitFor();
  await compare.locator('.js-plotly-plot').first().waitFor({ timeout: 60000 });
  await compare.scrollIntoViewIfNeeded();
  await page.waitForTimeout(1000);
  await lab.screenshot('workbench-c-compare-light');
  // The run shown in detail stands out, and its text stays readable in both themes.
  const selected = card('λ sweep').locator('.pp-RunRow.pp-mod-selected .pp-RunRow-label');
  expect(await textContrast(selected)).toBeGreaterThanOrEqual(4.5);
  await setTheme(page, 'JupyterLab Dark');
  await page.waitForTimeout(1500);
  await compare.scrollIntoViewIfNeeded();
  await lab.screenshot('workbench-c-compare-dark');
  expect(await textContrast(selected)).toBeGreaterThanOrEqual(4.5);
  await setTheme(page, 'JupyterLab Light');
  // The table in the workbench's narrow side column: a block per run with each figure's name
  // and unit beside its value, nothing scrolling sideways.
  const table = compare.locator('.pp-ComparePlots-table');
  await table.scrollIntoViewIfNeeded();
  await page.waitForTimeout(500);
  const fits = await table.evaluate(t => t.scrollWidth <= t.clientWidth + 1);
  await lab.screenshot('workbench-c-compare-table');
  expect(fits).toBe(true);
  expect(
    await table.locator('tbody td.pp-ComparePlots-num').first().getAttribute('data-label')
  ).toBe('convergence time (samples)');
  expect(labels.sort()).toEqual([
    'QR-RLS · M 16 · λ 0.99',
    'QR-RLS · M 16 · λ 0.995',
    'QR-RLS · M 16 · λ 0.999'
  ]);
  await lab.screenshot('workbench-c-sweep');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(d) a 1e6-sample M = 64 run cancelled halfway, then run to the end', async () => {
  await newSetup('adaptive', 'long record');
  await pick('x', 'long_reference');
  await pick('d', 'long_primary');
  await type('taps', '64');
  await saveAndRun();
  const running = card('long record').locator('.pp-RunRow[data-status="running"]').first();
  await running.waitFor({ timeout: 60000 });
  await page.waitForFunction(
    () => {
      const bar = document.querySelector<HTMLProgressElement>(
        '.pp-RunRow[data-status="running"] progress'
      );
      return !!bar && bar.value >= 0.3;
    },
    undefined,
    { timeout: 120000 }
  );
  await card('long record').locator('button', { hasText: 'Cancel' }).click();
  const row = await ended('long record', 'cancelled', 10000);
  await row.click();
  expect(await bench().locator('.pp-RunDetail-array').count()).toBe(0);
  await bench().locator('.pp-RunDetail-params summary').click();
  await expect(bench().locator('.pp-RunDetail-params').textContent()).resolves.toContain('64 taps');
  await lab.screenshot('workbench-d-cancelled');
  await card('long record').locator('button', { hasText: 'Run' }).click();
  await card('long record').locator('.pp-RunRow[data-status="ok"]').waitFor({ timeout: 300000 });
  await lab.screenshot('workbench-d-rerun');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(f) a mistyped form shows its messages on the fields and runs nothing', async () => {
  const before = await bench().locator('.pp-RunRow').count();
  await newSetup('adaptive', 'mistyped');
  await pick('x', 'reference');
  await pick('d', 'long_primary');
  await type('lambda', '1.5');
  await saveAndRun();
  await expect(field('lambda').locator('.pp-Field-error').textContent()).resolves.toContain(
    'must lie in (0, 1], got 1.5'
  );
  // λ first; with λ mended the lengths are checked.
  await type('lambda', '0.99');
  await saveAndRun();
  await expect(field('d').locator('.pp-Field-error').textContent()).resolves.toMatch(
    /reference has 32000 samples .* long_primary has 1000000/
  );
  await lab.screenshot('workbench-f-mistyped');
  expect(await bench().locator('.pp-RunRow').count()).toBe(before);
  expect(await card('mistyped').count()).toBe(0);
  await bench().locator('.pp-Editor-foot button', { hasText: 'Close' }).click();
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(g) a set-up that follows its source re-runs when the source cell is run again', async () => {
  const c = card('motor noise, QR-RLS');
  await c.locator('.pp-SetupCard-follow input').check();
  const before = await c.locator('.pp-RunRow').count();
  // Edit the primary cell (more sensor noise) and run it again.
  const cell = page.locator('.jp-NotebookPanel .jp-CodeCell', { hasText: 'primary = bearing' });
  await cell.locator('.jp-InputArea-editor').click();
  await page.keyboard.press('Control+End');
  await page.keyboard.insertText(
    '\nprimary = primary + 0.001 * rng.standard_normal(n_samples)\nprimary'
  );
  await page.keyboard.press('Shift+Enter');
  await c.locator('.pp-RunRow').nth(before).waitFor({ timeout: 60000 });
  await c.locator('.pp-RunRow[data-status="ok"]').nth(before).waitFor({ timeout: 120000 });
  await lab.screenshot('workbench-g-followed');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('(h) the kernel restarts during a run: the run says so, nothing else is lost', async () => {
  const setups = await bench().locator('.pp-SetupCard').count();
  await card('long record').locator('button', { hasText: 'Run' }).click();
  await card('long record')
    .locator('.pp-RunRow[data-status="running"], .pp-RunRow[data-status="reading"]')
    .first()
    .waitFor();
  // The Kernel menu acts on the notebook: the user clicks into it first.
  await page.locator('.jp-NotebookPanel .jp-Cell').first().click();
  await menu(page, 'Kernel', 'Restart Kernel…');
  await page.locator('.jp-Dialog .jp-Dialog-button.jp-mod-accept').click();
  // The newest run is the first row; it ends ok (computed on what was read before the restart)
  // or failed (the restart cut its read).
  const row = card('long record').locator('.pp-RunRow').first();
  await page.waitForFunction(
    () => {
      const c = Array.from(document.querySelectorAll('.pp-SetupCard')).find(x =>
        (x.textContent ?? '').includes('long record')
      );
      const r = c?.querySelector('.pp-RunRow');
      return !!r && /^(ok|failed)$/.test(r.getAttribute('data-status') ?? '');
    },
    undefined,
    { timeout: 300000 }
  );
  await row.click();
  const messages = (await bench().locator('.pp-RunDetail.pp-mod-summary').textContent()) ?? '';
  expect(messages).toMatch(/kernel restarted|Reading .* failed/);
  expect(await bench().locator('.pp-SetupCard').count()).toBe(setups);
  await lab.screenshot('workbench-h-restart');
  // The restart itself can take long on a loaded machine.
  await page.waitForFunction(
    () =>
      Array.from(document.querySelectorAll('.jp-StatusBar-Widget')).some(w =>
        /\|\s*Idle/.test(w.textContent ?? '')
      ),
    undefined,
    { timeout: 240000 }
  );
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

/** Run All, then wait until every cell with code has a number (empty cells never get one). */
async function runAllWithCode(): Promise<void> {
  // The Run menu acts on the notebook: the user clicks into it first.
  await page.locator('.jp-NotebookPanel .jp-Cell').first().click();
  await menu(page, 'Run', 'Run All Cells');
  await page.waitForFunction(
    () =>
      Array.from(document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) .jp-CodeCell'))
        .filter(c => (c.querySelector('.jp-InputArea-editor')?.textContent ?? '').trim() !== '')
        .every(c => /\[\d+\]/.test(c.querySelector('.jp-InputPrompt')?.textContent ?? '')),
    undefined,
    { timeout: 180000 }
  );
  // The notebook's toolbar is narrow beside the workbench (its kernel indicator folds away):
  // the status bar says when the kernel is idle.
  await page.waitForFunction(
    () =>
      Array.from(document.querySelectorAll('.jp-StatusBar-Widget')).some(w =>
        /\|\s*Idle/.test(w.textContent ?? '')
      ),
    undefined,
    { timeout: 60000 }
  );
}

test('(e) saved, reloaded and reopened: the set-ups are back and re-run all works', async () => {
  await runAllWithCode();
  await page.keyboard.press('Control+s');
  await page.waitForTimeout(1000);
  const titles = await bench().locator('.pp-SetupCard-title').allTextContents();
  await page.reload();
  await waitNotebookReady(page);
  if (!(await bench().isVisible())) {
    await palette(page, 'Open Perpend Workbench');
  }
  await bench().waitFor({ timeout: 30000 });
  await lab.screenshot('workbench-e-after-reload');
  expect(await bench().locator('.pp-SetupCard-title').allTextContents()).toEqual(titles);
  await runAllWithCode();
  // "motor noise" follows its sources (step g): running the cells again may start a run of its
  // own. "mains hum" does not follow: a new run of it that ends ok is Run All's.
  const hum = card('mains hum');
  const before = await hum
    .locator('.pp-RunRow')
    .evaluateAll(rows => rows.map(r => r.getAttribute('data-run')));
  await bench().click({ position: { x: 5, y: 5 } });
  await palette(page, 'Run All Set-ups Again');
  await page.waitForFunction(
    ids => {
      const c = Array.from(document.querySelectorAll('.pp-Workbench .pp-SetupCard')).find(e =>
        (e.querySelector('.pp-SetupCard-title')?.textContent ?? '').startsWith('mains hum')
      );
      return Array.from(c?.querySelectorAll('.pp-RunRow') ?? []).some(
        r => !ids.includes(r.getAttribute('data-run')) && r.getAttribute('data-status') === 'ok'
      );
    },
    before,
    { timeout: 300000 }
  );
  await card('motor noise, QR-RLS')
    .locator('.pp-RunRow[data-status="ok"]')
    .first()
    .waitFor({ timeout: 300000 });
  await lab.screenshot('workbench-e-reloaded');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
}, 600000);
