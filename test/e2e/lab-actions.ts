/** What a user does in JupyterLab, as playwright steps (menus, palette, waiting for the kernel). */
import type { Page } from 'playwright-core';

export async function openNotebook(page: Page, url: string): Promise<void> {
  await page.goto(url);
  await page.locator('.jp-NotebookPanel').first().waitFor({ state: 'visible', timeout: 60000 });
  await waitKernelIdle(page);
}

export async function waitKernelIdle(page: Page, timeout = 60000): Promise<void> {
  await page
    .locator('.jp-NotebookPanel:not(.lm-mod-hidden) .jp-Notebook-ExecutionIndicator[data-status="idle"]')
    .first()
    .waitFor({ state: 'attached', timeout });
}

export async function menu(page: Page, top: string, ...items: string[]): Promise<void> {
  await page.locator('.lm-MenuBar-itemLabel', { hasText: new RegExp(`^${top}$`) }).click();
  for (const item of items) {
    await page
      .locator('.lm-Menu:visible .lm-Menu-itemLabel', { hasText: new RegExp(`^${escape(item)}$`) })
      .first()
      .click();
  }
}

export async function runAllCells(page: Page): Promise<void> {
  await menu(page, 'Run', 'Run All Cells');
  // Every code cell gets a number and none stays queued ([*]).
  await page.waitForFunction(
    () => {
      const prompts = Array.from(document.querySelectorAll('.jp-NotebookPanel:not(.lm-mod-hidden) .jp-CodeCell .jp-InputPrompt'));
      return prompts.length > 0 && prompts.every(p => /\[\d+\]/.test(p.textContent ?? ''));
    },
    undefined,
    { timeout: 120000 }
  );
  await waitKernelIdle(page);
}

export async function palette(page: Page, command: string): Promise<void> {
  await page.keyboard.press('Control+Shift+C');
  const input = page.locator('.lm-CommandPalette-input');
  await input.waitFor({ state: 'visible' });
  await input.fill(command);
  await page
    .locator('.lm-CommandPalette-item:visible .lm-CommandPalette-itemLabel', { hasText: command })
    .first()
    .click();
}

export async function setTheme(page: Page, theme: 'JupyterLab Light' | 'JupyterLab Dark'): Promise<void> {
  await menu(page, 'Settings', 'Theme', theme);
  await page.waitForFunction(t => document.body.dataset.jpThemeName === t, theme, { timeout: 30000 });
  await page.waitForTimeout(500);
}

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}
