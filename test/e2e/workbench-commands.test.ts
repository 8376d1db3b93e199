/**
 * The workbench driven through its commands, as a keyboard user does: a set-up started from
 * the palette whose primary is a result computed on the Perpend panel (the demo's primary with
 * its mains hum projected off), run with Ctrl+Enter and checked against a NumPy recomputation;
 * a long run cancelled with Ctrl+.; a set-up duplicated from its context menu and removed from
 * the palette after its question; and, after a reload, the panel's result gone and said so.
 * On a copy of the demo notebook in a workspace of its own; screenshots in light and dark.
 */
import type { Locator, Page } from 'playwright-core';
import { openDemoWorkbench } from './workbench-form';
import type { LabBrowser } from './browser';
import {
  dismissToasts,
  palette,
  setTheme,
  waitNotebookReady,
  runCell as runLabCell
} from './lab-actions';

const ALLOW: RegExp[] = [];
const NOTEBOOK = 'workbench-commands.ipynb';
const SIDEBAR = '#perpend-sidebar';
const SHELF_RESULT = 'primary − hum';

let lab: LabBrowser;
let page: Page;

beforeAll(async () => {
  lab = await openDemoWorkbench(NOTEBOOK, 'perpend-commands');
  page = lab.page;
});

afterAll(async () => {
  await lab?.close();
});

/** Folds the side areas away (Ctrl+B, Ctrl+J are JupyterLab's), so the workbench has room. */
async function roomForTheWorkbench(): Promise<void> {
  if (await page.locator('#filebrowser').isVisible()) {
    await page.keyboard.press('Control+b');
  }
  if (await page.locator(SIDEBAR).isVisible()) {
    await page.keyboard.press('Control+j');
  }
  await page.locator(SIDEBAR).waitFor({ state: 'hidden' });
}

function bench(): Locator {
  return page.locator('.pp-Workbench').first();
}

function field(p: string): Locator {
  return bench().locator(`.pp-Editor .pp-Field[data-path="${p}"]`);
}

function card(title: string): Locator {
  return bench().locator('.pp-SetupCard', {
    has: page.locator('.pp-SetupCard-title', { hasText: new RegExp(`^${title}$`) })
  });
}

/** Picks a source by its option value (`v:name` for a variable, `s:label` for the panel's). */
async function pick(p: string, value: string): Promise<void> {
  const select = field(p).locator('select').first();
  await select.locator(`option[value="${value}"]`).waitFor({ state: 'attached', timeout: 90000 });
  await select.selectOption(value);
}

/** A new adaptive-filter set-up from the palette, saved without running. */
async function newFromPalette(title: string, x: string, d: string, taps: string): Promise<void> {
  await palette(page, 'New Set-up: Adaptive filter');
  await bench().locator('.pp-Editor form').waitFor();
  await bench().locator('.pp-Editor-title').fill(title);
  await pick('x', x);
  await pick('d', d);
  await field('taps').locator('input').fill(taps);
  await bench()
    .locator('.pp-Editor-foot button', { hasText: /^Save$/ })
    .click();
  await card(title).waitFor();
}

/** Clicks a card's title: the card becomes current and holds the keyboard. */
async function focusCard(title: string): Promise<void> {
  await card(title).locator('.pp-SetupCard-title').click();
  await expect(card(title).getAttribute('class')).resolves.toContain('pp-mod-current');
}

async function figure(key: string): Promise<number> {
  const cell = bench().locator(`.pp-RunDetail-figures tr[data-key="${key}"] td`).first();
  return Number(((await cell.textContent()) ?? '').replace('−', '-'));
}

const runCell = (code: string, expect: RegExp, timeout = 120000): Promise<string> =>
  runLabCell(page, code, expect, timeout);

test('a panel result as the primary, run with Ctrl+Enter; a long run cancelled with Ctrl+.', async () => {
  // On the panel: read primary, project the mains hum off it (5 harmonics of 50 Hz at fs).
  await palette(page, 'Open Perpend Panel');
  const sidebar = page.locator(SIDEBAR);
  const row = sidebar.locator('[data-kind="variables"] .pp-ArrayTable-row[data-label="primary"]');
  await row.waitFor({ timeout: 60000 });
  await row.focus();
  await page.keyboard.press('Enter');
  const loaded = sidebar.locator('.pp-LoadedItem[data-label="primary"]');
  await loaded.waitFor({ timeout: 60000 });
  // The load's notification can sit over the card's buttons (see dismissToasts).
  await dismissToasts(page);
  await loaded.locator('.pp-LoadedItem-hum').click();
  const dialog = page.locator('.jp-Dialog');
  const form = (name: string) => dialog.locator(`.pp-Form-field[data-field="${name}"] input`);
  await form('f0').fill('50');
  await form('fs').fill('fs');
  await form('harmonics').fill('5');
  await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
  await sidebar.locator(`.pp-LoadedItem[data-label="${SHELF_RESULT}"]`).waitFor({ timeout: 60000 });

  // A set-up from the palette: the reference from the kernel, the primary from the panel.
  await bench().click({ position: { x: 5, y: 5 } });
  await roomForTheWorkbench();
  await newFromPalette('de-hummed motor noise', 'v:reference', `s:${SHELF_RESULT}`, '16');
  await focusCard('de-hummed motor noise');
  const c = card('de-hummed motor noise');
  // The card's buttons say what their command does and its key.
  await expect(c.locator('button', { hasText: /^Run$/ }).getAttribute('title')).resolves.toMatch(
    /compute it in a worker.*\(Ctrl\+Enter\)$/
  );
  await page.keyboard.press('Control+Enter');
  await c.locator('.pp-RunRow[data-status="ok"]').first().waitFor({ timeout: 120000 });
  await c.locator('.pp-RunRow').first().click();
  expect(await figure('steadyStateMseDb')).toBeLessThan(-3);
  await bench().locator('.pp-RunDetail-params summary').click();
  await expect(bench().locator('.pp-RunDetail-params').textContent()).resolves.toContain(
    `panel: ${SHELF_RESULT}`
  );
  await lab.screenshot('workbench-commands-shelf-source-light');

  // The error written back through the command, then recomputed in NumPy: the hum projected
  // off primary by least squares on the cosines and sines of 50…250 Hz (numpy.linalg.lstsq),
  // then conventional RLS with P(0) = I/δ, w(0) = 0, which gives the same a-priori errors as
  // QR-RLS up to rounding (Haykin, Adaptive Filter Theory, 4th ed., ch. 13).
  await bench().locator('.pp-RunDetail-array[data-key="error"] button').click();
  const input = page.locator('.jp-Dialog input');
  await input.waitFor();
  await input.fill('e_dehum');
  await page.locator('.jp-Dialog-button.jp-mod-accept').click();
  await page
    .locator('.Toastify__toast', { hasText: 'as e_dehum' })
    .first()
    .waitFor({ timeout: 30000 });
  const out = await runCell(
    [
      't = np.arange(n_samples) / fs',
      'B = np.column_stack([f(2*np.pi*k*50.0*t) for k in range(1, 6) for f in (np.cos, np.sin)])',
      'dh = primary - B @ np.linalg.lstsq(B, primary, rcond=None)[0]',
      'M, lam, delta = 16, 0.999, 0.01',
      'P = np.eye(M) / delta; w = np.zeros(M); u = np.zeros(M); e_np = np.empty(n_samples)',
      'for n in range(n_samples):',
      '    u[1:] = u[:-1]; u[0] = reference[n]',
      '    Pu = P @ u; k = Pu / (lam + u @ Pu)',
      '    e_np[n] = dh[n] - w @ u; w = w + k * e_np[n]',
      '    P = (P - np.outer(k, Pu)) / lam; P = (P + P.T) / 2',
      "print('dehum-check', float(np.max(np.abs(e_dehum - e_np)) / np.max(np.abs(dh))) < 1e-8)"
    ].join('\n'),
    /dehum-check/
  );
  expect(out).toContain('dehum-check True');

  // A long run started with Ctrl+Enter and stopped with Ctrl+. on the current card.
  await bench().click({ position: { x: 5, y: 5 } });
  await newFromPalette('long record', 'v:long_reference', 'v:long_primary', '64');
  await focusCard('long record');
  await page.keyboard.press('Control+Enter');
  const long = card('long record');
  await long.locator('.pp-RunRow[data-status="running"]').first().waitFor({ timeout: 60000 });
  await page.keyboard.press('Control+.');
  await long.locator('.pp-RunRow[data-status="cancelled"]').first().waitFor({ timeout: 10000 });
  // Nothing runs now: the card's Cancel, bound to the same command, is disabled again.
  expect(await long.locator('button', { hasText: 'Cancel' }).isDisabled()).toBe(true);
  await lab.screenshot('workbench-commands-cancelled-light');
  await setTheme(page, 'JupyterLab Dark');
  await lab.screenshot('workbench-commands-cancelled-dark');
  await setTheme(page, 'JupyterLab Light');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
}, 600000);

/** Right-clicks `target` and chooses `item` in the context menu. */
async function contextMenu(target: Locator, item: string): Promise<void> {
  await target.click({ button: 'right' });
  const menu = page.locator('.lm-Menu:visible').last();
  await menu.locator('.lm-Menu-itemLabel', { hasText: item }).first().click();
}

test('a run compared and removed from its row’s context menu, the comparison cleared', async () => {
  const row = card('de-hummed motor noise').locator('.pp-RunRow').first();
  await contextMenu(row, 'Compare Run');
  await expect(row.locator('.pp-RunRow-compare').isChecked()).resolves.toBe(true);
  await bench().locator('.pp-Workbench-compare').waitFor();
  await palette(page, 'Clear Comparison');
  await expect(row.locator('.pp-RunRow-compare').isChecked()).resolves.toBe(false);
  await bench().locator('.pp-Workbench-compare').waitFor({ state: 'hidden' });
  // The cancelled long run goes; its set-up stays and can run again.
  const long = card('long record');
  await contextMenu(long.locator('.pp-RunRow').first(), 'Remove Run');
  await long.locator('.pp-RunRow').first().waitFor({ state: 'detached' });
  expect(await long.count()).toBe(1);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('duplicate from the card’s context menu; remove from the palette, asked once', async () => {
  await card('long record').locator('.pp-SetupCard-title').click({ button: 'right' });
  const menu = page.locator('.lm-Menu:visible').last();
  await menu.waitFor();
  // Nothing of this set-up runs: its cancel item is there but disabled.
  const cancelItem = menu.locator('.lm-Menu-item[data-command="perpend:workbench-cancel-setup"]');
  await expect(cancelItem.getAttribute('class')).resolves.toContain('lm-mod-disabled');
  await lab.screenshot('workbench-commands-context-menu');
  await menu.locator('.lm-Menu-itemLabel', { hasText: 'Duplicate Set-up' }).click();
  await expect(bench().locator('.pp-Editor-title').inputValue()).resolves.toBe(
    'long record (copy)'
  );
  await bench().locator('.pp-Editor-foot button', { hasText: 'Close' }).click();
  const copy = card('long record \\(copy\\)');
  await copy.waitFor();
  await expect(copy.getAttribute('class')).resolves.toContain('pp-mod-current');

  // Remove the current set-up (the copy): declined first, then confirmed.
  await palette(page, 'Remove Set-up…');
  const dialog = page.locator('.jp-Dialog', { hasText: 'Remove the set-up long record (copy)?' });
  await dialog.waitFor();
  await dialog.locator('.jp-Dialog-button.jp-mod-reject').click();
  await dialog.waitFor({ state: 'detached' });
  expect(await copy.count()).toBe(1);
  await palette(page, 'Remove Set-up…');
  await dialog.waitFor();
  await lab.screenshot('workbench-commands-remove-asked');
  await dialog.locator('.jp-Dialog-button.jp-mod-warn').click();
  await copy.waitFor({ state: 'detached' });
  expect(await card('long record').count()).toBe(1);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('reloaded: the panel’s result is gone, and the set-up that used it says so', async () => {
  await page.locator('.jp-NotebookPanel .jp-Cell').first().click();
  await page.keyboard.press('Control+s');
  await page.waitForTimeout(1000);
  await page.reload();
  await waitNotebookReady(page);
  if (!(await bench().isVisible())) {
    await palette(page, 'Open Perpend Workbench');
  }
  await card('de-hummed motor noise').waitFor({ timeout: 30000 });
  await roomForTheWorkbench();
  // Ctrl+Enter on the card: the run fails, naming the panel's array and why it is gone.
  await focusCard('de-hummed motor noise');
  await page.keyboard.press('Control+Enter');
  const c = card('de-hummed motor noise');
  await c.locator('.pp-RunRow[data-status="failed"]').first().waitFor({ timeout: 60000 });
  await c.locator('.pp-RunRow').first().click();
  await expect(bench().locator('.pp-RunDetail.pp-mod-summary').textContent()).resolves.toMatch(
    /“primary − hum” is no longer on the Perpend panel/
  );
  // In the editor the same check marks the field; Ctrl+Enter there saves and runs the form.
  await c.locator('button', { hasText: 'Edit' }).click();
  await field('taps').locator('input').focus();
  await page.keyboard.press('Control+Enter');
  await expect(field('d').locator('.pp-Field-error').textContent()).resolves.toMatch(
    /“primary − hum” on the Perpend panel is gone: .* reload/
  );
  await lab.screenshot('workbench-commands-shelf-gone');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
}, 300000);
