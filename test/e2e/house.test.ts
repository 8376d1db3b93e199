/**
 * The panel by JupyterLab's conventions (issue 9, point 3), in the real JupyterLab: rows used
 * from the keyboard, the output context-menu item only on outputs that can hold an array, the
 * shortcut that sends the active cell's output, the refresh command in the panel's toolbar,
 * dialogs that check their fields in place, outcomes as notifications, the source dtype and why
 * a tool is unavailable. Screenshots of the side panel in the light and dark themes.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { LabBrowser, SCREENSHOTS } from './browser';
import { REPO } from './lab-server';
import {
  dismissToasts,
  openNotebook,
  palette,
  runAllCells,
  setTheme,
  waitKernelIdle
} from './lab-actions';

const ALLOW: RegExp[] = [];
// A notebook and workspace of its own, so that this file's kernel touches no other test's.
const NOTEBOOK = 'perpend-house.ipynb';
const WORKSPACE = 'perpend-house';
const SIDEBAR = '#perpend-sidebar';
const SHOWN = '.jp-NotebookPanel:not(.lm-mod-hidden)';

let lab: LabBrowser;

beforeAll(async () => {
  lab = await LabBrowser.open();
  // The demo plus cells whose outputs cannot hold an array: a stream, an error and an image.
  const nb = JSON.parse(fs.readFileSync(path.join(REPO, 'demo', 'perpend-demo.ipynb'), 'utf8'));
  const code = (source: string) => ({
    cell_type: 'code',
    metadata: {},
    execution_count: null,
    outputs: [],
    source
  });
  // A 1×1 PNG (the smallest valid image; PNG specification, ISO/IEC 15948).
  const png =
    'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8z8BQDwAEhQGAhKmMIQAAAABJRU5ErkJggg==';
  nb.cells.push(
    code("print('printed', list(range(3)))"),
    code(`from IPython.display import display\ndisplay({'image/png': '${png}'}, raw=True)`),
    code('small = np.arange(6, dtype=np.int16).reshape(2, 3)\nsmall'),
    code("raise ValueError('an error output')")
  );
  fs.writeFileSync(path.join(lab.state.rootDir, NOTEBOOK), JSON.stringify(nb));
});

afterAll(async () => {
  await lab?.close();
});

function cell(page: Page, text: string) {
  return page.locator(`${SHOWN} .jp-CodeCell`, { hasText: text }).first();
}

async function contextMenuItems(page: Page, text: string): Promise<string[]> {
  const output = cell(page, text).locator('.jp-OutputArea-output').first();
  await output.click({ button: 'right' });
  const menu = page.locator('.lm-Menu').first();
  await menu.waitFor({ state: 'visible' });
  const labels = await menu.locator('.lm-Menu-itemLabel').allTextContents();
  await page.keyboard.press('Escape');
  await menu.waitFor({ state: 'hidden' });
  return labels;
}

test('rows work from the keyboard and name their shape and dtype; a load is a notification', async () => {
  const page = lab.page;
  await openNotebook(page, lab.url(`/lab/workspaces/${WORKSPACE}/tree/${NOTEBOOK}`));
  // Run All stops at the error cell, the last one: every other cell has run.
  await runAllCells(page);
  await palette(page, 'Open Perpend Panel');
  const sidebar = page.locator(SIDEBAR);
  await sidebar.waitFor({ state: 'visible' });

  // The panel is a SidePanel: its title in the header, the refresh command in its toolbar.
  await expect(sidebar.locator('.jp-SidePanel-header h2').textContent()).resolves.toBe('Perpend');
  const refresh = sidebar.locator('.jp-SidePanel-toolbar [data-command="perpend:refresh-arrays"]');
  await refresh.waitFor({ state: 'visible' });
  expect(await refresh.isEnabled()).toBe(true);

  const row = sidebar.locator('[data-kind="variables"] .pp-ArrayTable-row[data-label="small"]');
  await row.waitFor({ timeout: 60000 });
  expect(await row.getAttribute('role')).toBe('button');
  expect(await row.getAttribute('aria-label')).toMatch(/small.*2\u202f×\u202f3.*int16/);
  // The size is shown in the row, not only in a tooltip.
  await expect(row.locator('.pp-ArrayTable-size').isVisible()).resolves.toBe(true);
  await expect(row.locator('.pp-ArrayTable-size').textContent()).resolves.toBe('12 B');

  await row.focus();
  await page.keyboard.press('Enter');
  const small = sidebar.locator('.pp-LoadedItem[data-label="small"]');
  await small.waitFor({ timeout: 30000 });
  const toast = page.locator('.Toastify__toast', { hasText: 'Loaded small' });
  await toast.first().waitFor({ timeout: 30000 });
  // The int16 it was in the kernel stands beside the float64 Perpend computes in.
  await expect(small.locator('.pp-LoadedItem-meta').textContent()).resolves.toBe(
    '2\u202f×\u202f3 float64 from int16'
  );

  const ref = sidebar.locator('[data-kind="variables"] .pp-ArrayTable-row[data-label="reference"]');
  await ref.focus();
  await page.keyboard.press(' ');
  await sidebar.locator('.pp-LoadedItem[data-label="reference"]').waitFor({ timeout: 30000 });

  // The cell results share the output-cache note: it is said once, visibly, under the heading.
  await expect(
    sidebar.locator('[data-kind="cells"] .pp-SourcesView-note').first().textContent()
  ).resolves.toMatch(/output cache/);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the output context-menu item is offered only on outputs that can hold an array', async () => {
  const page = lab.page;
  const send = 'Send Output to Perpend';
  expect(await contextMenuItems(page, 'small = np.arange')).toContain(send);
  expect(await contextMenuItems(page, "print('printed'")).not.toContain(send);
  expect(await contextMenuItems(page, "display({'image/png'")).not.toContain(send);
  expect(await contextMenuItems(page, 'an error output')).not.toContain(send);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test("the shortcut sends the active cell's array output to the panel", async () => {
  const page = lab.page;
  const sidebar = page.locator(SIDEBAR);
  // The schema's menu entries and shortcuts: View ▸ Perpend lists the commands with their keys.
  await page.locator('.lm-MenuBar-itemLabel', { hasText: /^View$/ }).click();
  await page.locator('.lm-Menu:visible .lm-Menu-itemLabel', { hasText: /^Perpend$/ }).hover();
  const submenu = page.locator('.lm-Menu:visible', { hasText: 'Open Perpend Panel' }).last();
  await submenu.waitFor();
  const entries = await submenu
    .locator('.lm-Menu-item')
    .evaluateAll(items =>
      items.map(i =>
        [
          i.querySelector('.lm-Menu-itemLabel')?.textContent ?? '',
          i.querySelector('.lm-Menu-itemShortcut')?.textContent ?? ''
        ].join(' | ')
      )
    );
  // The workbench plugin's schema adds its commands to the same submenu, ranked among these.
  expect(entries).toEqual([
    'Open Perpend Panel | ',
    'Open Perpend Workbench | Ctrl+Alt+W',
    'List Notebook Arrays Again | Ctrl+Alt+R',
    'Send Cell Output to Perpend | Ctrl+Alt+P',
    ' | ',
    'New Set-up | ',
    'Run All Set-ups Again | Ctrl+Shift+Enter',
    'Cancel Running Set-ups | Ctrl+Shift+Esc',
    'Run Set-up | Ctrl+Enter',
    'Cancel Set-up’s Run | Ctrl+.',
    'Edit Set-up | ',
    'Duplicate Set-up | ',
    'Re-run Set-up When Its Sources Change | ',
    'Remove Set-up… | ',
    ' | ',
    'Compare the Runs of Set-up | ',
    'Clear Comparison | ',
    'Write Whole Run to Kernel… | ',
    'Write Result Array to Kernel… | ',
    'Remove Run | '
  ]);
  await page.keyboard.press('Escape');
  await page.keyboard.press('Escape');
  await cell(page, 'baseband = (primary').locator('.jp-InputPrompt').click();
  await page.keyboard.press('Escape');
  await page.keyboard.press('Control+Alt+p');
  const item = sidebar.locator('.pp-LoadedItem', { hasText: 'complex128' }).first();
  await item.waitFor({ timeout: 30000 });
  expect(await item.getAttribute('data-origin')).toBe('kernel');
  // Hum removal is real-only: the button stays, disabled, and the card says why.
  const hum = item.locator('.pp-LoadedItem-hum');
  expect(await hum.isDisabled()).toBe(true);
  await expect(item.locator('.pp-LoadedItem-unavailable').textContent()).resolves.toMatch(
    /is complex; hum removal with real harmonics needs a real signal/
  );
  await waitKernelIdle(page);
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the hum dialog marks a bad value on its field, stays open and keeps what was typed', async () => {
  const page = lab.page;
  const sidebar = page.locator(SIDEBAR);
  const card = sidebar.locator('.pp-LoadedItem[data-label="reference"]');
  await dismissToasts(page);
  await card.locator('.pp-LoadedItem-hum').click();
  const dialog = page.locator('.jp-Dialog');
  await dialog.waitFor();
  const field = (name: string) => dialog.locator(`.pp-Form-field[data-field="${name}"]`);
  await field('f0').locator('input').fill('-5');
  await field('harmonics').locator('input').fill('2.5');
  await field('fs').locator('input').fill('no_such_rate');
  await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
  await field('f0').locator('.pp-Form-error', { hasText: 'above 0 Hz' }).waitFor();
  await field('harmonics').locator('.pp-Form-error', { hasText: 'whole number' }).waitFor();
  expect(await field('f0').getAttribute('class')).toContain('pp-mod-invalid');
  expect(await field('f0').locator('input').inputValue()).toBe('-5');
  await lab.screenshot('house-hum-dialog-invalid');

  // Numbers fixed, the name is read from the kernel on accept: it does not exist there.
  await field('f0').locator('input').fill('50');
  await field('harmonics').locator('input').fill('5');
  await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
  await field('fs').locator('.pp-Form-error', { hasText: 'no_such_rate' }).waitFor({
    timeout: 30000
  });
  expect(await dialog.isVisible()).toBe(true);
  expect(await field('f0').locator('.pp-Form-error').isVisible()).toBe(false);

  // A name that exists (fs = 4000.0 in the demo) is read and the tool runs.
  await field('fs').locator('input').fill('fs');
  await page.keyboard.press('Enter');
  await dialog.waitFor({ state: 'detached', timeout: 30000 });
  const result = sidebar.locator('.pp-LoadedItem[data-origin="result"]');
  await result.waitFor({ timeout: 30000 });
  await expect(result.locator('.pp-LoadedItem-notes').textContent()).resolves.toContain(
    'fs = 4000 Hz'
  );
  await page.locator('.Toastify__toast', { hasText: 'reference − hum' }).first().waitFor();
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the save dialog refuses a bad name in place; a name in use asks once', async () => {
  const page = lab.page;
  const sidebar = page.locator(SIDEBAR);
  const result = sidebar.locator('.pp-LoadedItem[data-origin="result"]');
  await dismissToasts(page);
  await result.locator('.pp-LoadedItem-save').click();
  const dialog = page.locator('.jp-Dialog');
  const input = dialog.locator('input');
  await input.fill('2nd try');
  await page.keyboard.press('Enter');
  await dialog
    .locator('.pp-Form-error', { hasText: 'Not a valid Python name' })
    .waitFor({ timeout: 10000 });
  expect(await input.inputValue()).toBe('2nd try');
  // `small` is taken: the one replace question comes, and Cancel keeps the variable.
  await input.fill('small');
  await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
  const question = page.locator('.jp-Dialog', { hasText: 'Replace small?' });
  await question.waitFor({ timeout: 30000 });
  await question.locator('.jp-Dialog-button', { hasText: 'Cancel' }).click();
  await question.waitFor({ state: 'detached' });
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the side panel in the light and dark themes', async () => {
  const page = lab.page;
  const sidebar = page.locator(SIDEBAR);
  fs.mkdirSync(SCREENSHOTS, { recursive: true });
  await dismissToasts(page);
  for (const [theme, name] of [
    ['JupyterLab Light', 'house-sidepanel-light'],
    ['JupyterLab Dark', 'house-sidepanel-dark']
  ] as const) {
    await setTheme(page, theme);
    // A tall window, so that the whole panel (list and loaded arrays) is in one picture.
    await page.setViewportSize({ width: 1400, height: 1800 });
    await sidebar.locator('.jp-SidePanel-content').evaluate(n => n.scrollTo(0, 0));
    await sidebar.screenshot({ path: path.join(SCREENSHOTS, `${name}.png`) });
    await page.setViewportSize({ width: 1400, height: 860 });
    await lab.screenshot(`${name}-page`);
  }
  await setTheme(page, 'JupyterLab Light');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});
