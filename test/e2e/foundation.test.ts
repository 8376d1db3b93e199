/**
 * The foundation journey (issue: Foundation): open the demo notebook in the real JupyterLab, run
 * all cells, open Perpend from the command palette, and find the demo's arrays listed with the
 * shapes and dtypes numpy gives them. Screenshots in the light and dark themes.
 */
import { LabBrowser } from './browser';
import { openNotebook, palette, runAllCells, setTheme } from './lab-actions';

// Faults this journey expects: none. (Add a pattern here only for a fault the test provokes.)
const ALLOW: RegExp[] = [];

let lab: LabBrowser;

beforeAll(async () => {
  lab = await LabBrowser.open();
});

afterAll(async () => {
  await lab?.close();
});

test('the demo arrays are listed in the Perpend panel with their shapes and dtypes', async () => {
  const page = lab.page;
  await openNotebook(page, lab.url('/lab/tree/perpend-demo.ipynb'));
  await runAllCells(page);
  await palette(page, 'Open Perpend Panel');
  const sidebar = page.locator('#perpend-sidebar');
  await sidebar.waitFor({ state: 'visible' });

  const rows = sidebar.locator('.pp-SourcesView-section[data-kind="cells"] .pp-ArrayTable-row');
  await page.waitForFunction(
    () =>
      document.querySelectorAll('#perpend-sidebar [data-kind="cells"] .pp-ArrayTable-row').length >=
      7,
    undefined,
    { timeout: 60000 }
  );
  const listed = await rows.evaluateAll(trs =>
    trs.map(tr => ({
      label: tr.querySelector('.pp-ArrayTable-label')?.textContent ?? '',
      shape: tr.querySelector('.pp-ArrayTable-shape')?.textContent ?? '',
      dtype: tr.querySelector('.pp-ArrayTable-dtype')?.textContent ?? ''
    }))
  );
  // The shapes and dtypes numpy reports for the demo (demo/build_demo_notebook.py): reference,
  // primary, rail, baseband, received, and the shape tuples of sensors (2,) and long_primary
  // (1,), which are lists of numbers.
  const pairs = listed.map(r => `${r.shape.replace(/\u202f/g, ' ')} ${r.dtype}`).sort();
  expect(pairs).toEqual(
    [
      '32000 float64',
      '32000 float64',
      '4 × 32000 float64',
      '4000 complex128',
      '4000 complex128',
      '2 int64',
      '1 int64'
    ].sort()
  );
  // The summary cell returns a dict, not an array: it must not be listed.
  expect(listed.length).toBe(7);

  const variables = sidebar.locator(
    '.pp-SourcesView-section[data-kind="variables"] .pp-ArrayTable-row'
  );
  const names = await variables.evaluateAll(trs => trs.map(tr => tr.getAttribute('data-label')));
  for (const name of ['reference', 'primary', 'rail', 'baseband', 't']) {
    expect(names).toContain(name);
  }

  await setTheme(page, 'JupyterLab Light');
  await lab.screenshot('foundation-light');
  await setTheme(page, 'JupyterLab Dark');
  await lab.screenshot('foundation-dark');
  await setTheme(page, 'JupyterLab Light');

  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});

test('the settings schema shows in the Settings Editor', async () => {
  const page = lab.page;
  await palette(page, 'Settings Editor');
  const entry = page.locator('.jp-PluginList-entry', { hasText: 'Perpend' }).first();
  await entry.waitFor({ state: 'visible', timeout: 30000 });
  await entry.click();
  await page
    .getByText('Kernel request timeout (s)')
    .first()
    .waitFor({ state: 'visible', timeout: 30000 });
  await lab.screenshot('settings-editor');
  expect(lab.unexpectedFaults(ALLOW)).toEqual([]);
});
