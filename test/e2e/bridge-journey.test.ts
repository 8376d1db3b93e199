/**
 * The kernel bridge as a user meets it (issue: Kernel bridge): run a cell, see its array listed,
 * send it to the panel from the output's context menu (read at full precision from IPython's
 * output cache, although the printed repr is truncated), remove the mains hum, write the result
 * back under a new name and read it in a new cell.
 */
import { LabBrowser } from './browser';
import { dismissToasts, openNotebook, palette, runAllCells } from './lab-actions';

const ALLOW: RegExp[] = [];

let lab: LabBrowser;

beforeAll(async () => {
  lab = await LabBrowser.open();
});

afterAll(async () => {
  await lab?.close();
});

test('send an output to Perpend, remove the hum, write the result back and read it in a cell', async () => {
  const page = lab.page;
  await openNotebook(page, lab.url('/lab/tree/perpend-demo.ipynb'));
  await runAllCells(page);
  await palette(page, 'Open Perpend Panel');
  const sidebar = page.locator('#perpend-sidebar');
  await sidebar
    .locator('[data-kind="cells"] .pp-ArrayTable-row')
    .nth(3)
    .waitFor({ timeout: 60000 });

  // The primary channel's output ("primary" is the last expression of the fourth cell).
  const output = page
    .locator('.jp-CodeCell', { hasText: 'primary = bearing' })
    .locator('.jp-OutputArea-child')
    .first();
  await output.click({ button: 'right' });
  await page.locator('.lm-Menu-itemLabel', { hasText: 'Send Output to Perpend' }).click();
  const card = sidebar.locator('.pp-LoadedItem').first();
  await card.waitFor({ timeout: 30000 });
  // Read from the kernel, not from the printed repr: all 32000 samples are there.
  await expect(card.locator('.pp-LoadedItem-meta').textContent()).resolves.toMatch(
    /^32000 float64$/
  );
  await expect(card.locator('.pp-LoadedItem-stats').textContent()).resolves.toMatch(
    /^N 32000 · RMS/
  );
  expect(await card.getAttribute('data-origin')).toBe('kernel');

  // Remove the hum: fs is prefilled from the kernel variable fs = 4000. The load's notification
  // can sit over the card's buttons, and its timer pauses while the pointer rests on it or the
  // headless window has no focus.
  await dismissToasts(page);
  await card.locator('.pp-LoadedItem-hum').click();
  const dialog = page.locator('.jp-Dialog');
  await dialog.waitFor();
  expect(await dialog.locator('input[name="fs"]').inputValue()).toBe('4000');
  await lab.screenshot('bridge-hum-dialog');
  await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
  const result = sidebar.locator('.pp-LoadedItem[data-origin="result"]');
  await result.waitFor({ timeout: 30000 });
  const notes = (await result.locator('.pp-LoadedItem-notes').textContent()) ?? '';
  const suppression = /Suppression ([\d.]+) dB/.exec(notes)?.[1];
  expect(suppression).toBeDefined();
  expect(notes).toContain('Projected off 10 harmonic directions');

  // Save it to the kernel as primary_dehum (past the removal's notification).
  await dismissToasts(page);
  await result.locator('.pp-LoadedItem-save').click();
  const nameInput = page.locator('.jp-Dialog input');
  await nameInput.waitFor();
  await nameInput.fill('primary_dehum');
  await page.locator('.jp-Dialog-button.jp-mod-accept').click();
  await sidebar
    .locator('.pp-LoadedView-status', { hasText: 'as primary_dehum' })
    .waitFor({ timeout: 30000 });
  await lab.screenshot('bridge-written-back');

  // Read it in a new cell: the same projection done in numpy agrees to rounding.
  await page.locator('.jp-CodeCell').last().click();
  await page.keyboard.press('Escape');
  await page.keyboard.press('b');
  await page.keyboard.press('Enter');
  await page.keyboard.type(
    'B = np.column_stack([f(2*np.pi*k*f0*t) for k in range(1, 6) for f in (np.cos, np.sin)]); ' +
      'ref = primary - B @ np.linalg.lstsq(B, primary, rcond=None)[0]; ' +
      "print('check', primary_dehum.dtype, primary_dehum.shape, float(np.max(np.abs(primary_dehum - ref))) < 1e-9, " +
      "f'{10*np.log10(np.sum(primary**2)/np.sum(ref**2)):.1f}')"
  );
  await page.keyboard.press('Shift+Enter');
  // NumPy's least-squares projection (numpy.linalg.lstsq) gives the same samples, and the same
  // suppression in dB as the panel showed.
  await page
    .locator('.jp-OutputArea-output', { hasText: `check float64 (32000,) True ${suppression}` })
    .waitFor({ timeout: 30000 });
  await lab.screenshot('bridge-read-in-cell');

  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('a read asked for while a cell runs waits for it, and the panel says so', async () => {
  const page = lab.page;
  const sidebar = page.locator('#perpend-sidebar');
  await page.locator('.jp-CodeCell').last().click();
  await page.keyboard.press('Escape');
  await page.keyboard.press('b');
  await page.keyboard.press('Enter');
  await page.keyboard.type("import time; time.sleep(6); print('slept')");
  await page.keyboard.press('Shift+Enter');
  await page
    .locator('.jp-Notebook-ExecutionIndicator[data-status="busy"]')
    .first()
    .waitFor({ timeout: 10000 });
  await sidebar
    .locator('[data-kind="variables"] .pp-ArrayTable-row[data-label="reference"]')
    .click();
  const status = sidebar.locator('.pp-LoadedView-status');
  await status
    .filter({
      hasText: 'Waiting for the kernel to finish the running cell before reading reference'
    })
    .waitFor({ timeout: 10000 });
  await lab.screenshot('bridge-waiting');
  await sidebar.locator('.pp-LoadedItem[data-label="reference"]').waitFor({ timeout: 60000 });
  await page.locator('.jp-OutputArea-output', { hasText: 'slept' }).waitFor({ timeout: 30000 });
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});
