/**
 * Driving the workbench's set-up editor as a user does, for the browser tests: start a set-up
 * of a tool, pick listed arrays, type and choose values (opening *More settings* when the field
 * is folded), save and run, find a set-up's card.
 */
import fs from 'node:fs';
import path from 'node:path';
import type { Locator, Page } from 'playwright-core';
import { LabBrowser } from './browser';
import { openNotebook, palette, runAllCells } from './lab-actions';

export interface WorkbenchForm {
  bench(): Locator;
  field(path: string): Locator;
  card(title: string): Locator;
  newSetup(tool: string, title: string): Promise<void>;
  /** Picks a listed kernel variable (waits until the kernel lists it). */
  pick(path: string, name: string): Promise<void>;
  type(path: string, text: string): Promise<void>;
  choose(path: string, value: string): Promise<void>;
  /** Saves and runs; fails with the form's own messages when it refuses. */
  saveAndRun(title: string): Promise<void>;
}

export function workbenchForm(page: Page): WorkbenchForm {
  const bench = (): Locator => page.locator('.pp-Workbench').first();
  const field = (p: string): Locator => bench().locator(`.pp-Editor .pp-Field[data-path="${p}"]`);
  const card = (title: string): Locator => bench().locator('.pp-SetupCard', { hasText: title });
  return {
    bench,
    field,
    card,
    async newSetup(tool, title) {
      await bench().locator(`.pp-Workbench-tool[data-tool="${tool}"]`).click();
      await bench().locator('.pp-Editor form').waitFor();
      await bench().locator('.pp-Editor-title').fill(title);
    },
    async pick(p, name) {
      const select = field(p).locator('select').first();
      await select
        .locator(`option[value="v:${name}"]`)
        .waitFor({ state: 'attached', timeout: 180000 });
      await select.selectOption(`v:${name}`);
    },
    async type(p, text) {
      if (!(await field(p).isVisible())) {
        await bench().locator('.pp-Editor-more > summary').click();
      }
      await field(p).locator('input').first().fill(text);
    },
    async choose(p, value) {
      await field(p).locator('select').first().selectOption(value);
    },
    async saveAndRun(title) {
      await bench().locator('.pp-Editor-foot button', { hasText: 'Save and run' }).click();
      try {
        await card(title).waitFor({ timeout: 15000 });
      } catch {
        const issues = await bench().locator('.pp-Editor').textContent();
        throw new Error(`the set-up "${title}" was not saved; the form says: ${issues}`);
      }
    }
  };
}

/**
 * A browser on a copy of the demo notebook named `notebook`, in a workspace of its own (the
 * layout it leaves is not restored into the other browser tests' workspaces), its cells run and
 * its workbench open.
 */
export async function openDemoWorkbench(notebook: string, workspace: string): Promise<LabBrowser> {
  const lab = await LabBrowser.open();
  fs.copyFileSync(
    path.join(__dirname, '..', '..', 'demo', 'perpend-demo.ipynb'),
    path.join(lab.state.rootDir, notebook)
  );
  await openNotebook(lab.page, lab.url(`/lab/workspaces/${workspace}/tree/${notebook}`));
  await runAllCells(lab.page);
  await palette(lab.page, 'Open Perpend Workbench');
  await lab.page.locator('.pp-Workbench').first().waitFor({ timeout: 30000 });
  return lab;
}
