/**
 * The page is reloaded while the kernel keeps running: the cells still show their counts and
 * Perpend lists their results again, after checking each cell's text against the kernel's input
 * history. A cell edited after it ran is not listed until it runs again.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { LabBrowser } from './browser';
import { REPO } from './lab-server';
import { openNotebook, palette, runAllCells, waitNotebookReady } from './lab-actions';

const ALLOW: RegExp[] = [];
// A notebook of its own, so that this file's kernel session and saves touch no other test's.
const NOTEBOOK = 'perpend-reload.ipynb';
// A workspace of its own too: the shared one may restore other tests' notebooks beside it.
const WORKSPACE = 'perpend-reload';
const CELL_ROWS = '#perpend-sidebar [data-kind="cells"] .pp-ArrayTable-row';
const SHOWN = '.jp-NotebookPanel:not(.lm-mod-hidden)';

let lab: LabBrowser;

beforeAll(async () => {
  lab = await LabBrowser.open();
  fs.copyFileSync(
    path.join(REPO, 'demo', 'perpend-demo.ipynb'),
    path.join(lab.state.rootDir, NOTEBOOK)
  );
});

afterAll(async () => {
  await lab?.close();
});

async function save(page: Page): Promise<void> {
  // Command mode keeps the focus in the notebook, where JupyterLab's Ctrl+S saves it. (The
  // tab's dirty mark, not the cells': an edited cell stays marked until it runs again.)
  await page.keyboard.press('Escape');
  await page.keyboard.press('Control+s');
  try {
    await page.waitForFunction(
      () => document.querySelector('.lm-TabBar-tab.jp-mod-dirty') === null,
      undefined,
      {
        timeout: 30000
      }
    );
  } catch (e) {
    await lab.screenshot('reload-save-failed');
    throw e;
  }
}

/** Waits until the panel lists `n` cell results and returns their labels. */
async function cellLabels(page: Page, n: number): Promise<string[]> {
  await page.waitForFunction(
    ([sel, k]) => document.querySelectorAll(sel as string).length === k,
    [CELL_ROWS, n] as const,
    { timeout: 60000 }
  );
  return page
    .locator(CELL_ROWS)
    .evaluateAll(trs => trs.map(tr => tr.getAttribute('data-label') ?? ''));
}

/** The execution count the cell containing `text` shows in its prompt. */
async function promptOf(page: Page, text: string): Promise<number> {
  const prompt = await page
    .locator(`${SHOWN} .jp-CodeCell`, { hasText: text })
    .locator('.jp-InputPrompt')
    .first()
    .textContent();
  const m = /\[(\d+)\]/.exec(prompt ?? '');
  if (!m) {
    throw new Error(`no execution count on the cell with ${text}: ${prompt}`);
  }
  return Number(m[1]);
}

async function reload(page: Page): Promise<void> {
  await page.reload();
  await waitNotebookReady(page);
  // The layout restorer usually reopens the panel; otherwise its sidebar tab does, as a user
  // would (the palette can lose the focus to the notebook while the page is settling).
  const sidebar = page.locator('#perpend-sidebar');
  if (!(await sidebar.isVisible())) {
    await page
      .locator('.jp-SideBar.jp-mod-right .lm-TabBar-tab[data-id="perpend-sidebar"]')
      .click();
  }
  await sidebar.waitFor({ state: 'visible' });
}

test('after a reload the cell results are listed again, checked against the kernel', async () => {
  const page = lab.page;
  await openNotebook(page, lab.url(`/lab/workspaces/${WORKSPACE}/tree/${NOTEBOOK}`));
  await runAllCells(page);
  await palette(page, 'Open Perpend Panel');
  // The demo's seven array results (see foundation.test.ts).
  const before = await cellLabels(page, 7);
  await save(page);

  await reload(page);
  // The same seven results, under the counts the cells show.
  expect(await cellLabels(page, 7)).toEqual(before);
  const rail = await promptOf(page, 'Four sensors along');
  expect(before).toContain(`Out[${rail}]`);
  await lab.screenshot('reload-listed-again');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('a cell edited after it ran is not listed until it runs again', async () => {
  const page = lab.page;
  const cell = page.locator(`${SHOWN} .jp-CodeCell`, { hasText: 'Four sensors along' });
  const rail = await promptOf(page, 'Four sensors along');
  await cell.locator('.cm-content').click();
  await page.keyboard.press('Control+End');
  await page.keyboard.type('\n# gains from the 2026 calibration');
  await save(page);

  await reload(page);
  // Its text is no longer what the kernel ran as its count: the other six only.
  const six = await cellLabels(page, 6);
  expect(six).not.toContain(`Out[${rail}]`);
  expect(await promptOf(page, 'Four sensors along')).toBe(rail);
  await lab.screenshot('reload-edited-not-listed');

  // Run it again: the panel lists its new result.
  await page
    .locator(`${SHOWN} .jp-CodeCell`, { hasText: 'Four sensors along' })
    .locator('.cm-content')
    .click();
  await page.keyboard.press('Control+Enter');
  await page.waitForFunction(
    r => {
      const cells = Array.from(
        document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) .jp-CodeCell')
      );
      const c = cells.find(x => (x.textContent ?? '').includes('Four sensors along'));
      const m = /\[(\d+)\]/.exec(c?.querySelector('.jp-InputPrompt')?.textContent ?? '');
      return m !== null && Number(m[1]) > r;
    },
    rail,
    { timeout: 60000 }
  );
  const rerun = await promptOf(page, 'Four sensors along');
  const seven = await cellLabels(page, 7);
  expect(seven).toContain(`Out[${rerun}]`);
  expect(seven.filter(l => six.includes(l))).toHaveLength(6);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});
