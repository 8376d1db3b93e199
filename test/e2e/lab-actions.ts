/** What a user does in JupyterLab, as playwright steps (menus, palette, waiting for the kernel). */
import type { Locator, Page } from 'playwright-core';

export async function openNotebook(page: Page, url: string): Promise<void> {
  await page.goto(url);
  await waitNotebookReady(page);
}

/** Waits, after a page load or reload, until a notebook is shown and its kernel is idle. */
export async function waitNotebookReady(page: Page): Promise<void> {
  await page.locator('.jp-NotebookPanel').first().waitFor({ state: 'visible', timeout: 60000 });
  // JupyterLab may ask which kernel to start; a user accepts the preferred one.
  const deadline = Date.now() + 60000;
  for (;;) {
    const dialog = page.locator('.jp-Dialog', { hasText: 'Select Kernel' });
    if (await dialog.isVisible()) {
      await dialog.locator('.jp-Dialog-button.jp-mod-accept').click();
    }
    const status = (
      await page.locator('.jp-StatusBar-Widget', { hasText: '|' }).allTextContents()
    ).join(' ');
    if (/\|\s*Idle/.test(status)) {
      break;
    }
    if (Date.now() > deadline) {
      throw new Error(`the kernel did not become idle within 60 s (status bar: ${status})`);
    }
    await page.waitForTimeout(250);
  }
  await waitKernelIdle(page);
}

export async function waitKernelIdle(page: Page, timeout = 60000): Promise<void> {
  await page
    .locator(
      '.jp-NotebookPanel:not(.lm-mod-hidden) .jp-Notebook-ExecutionIndicator[data-status="idle"]'
    )
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
      const prompts = Array.from(
        document.querySelectorAll(
          '.jp-NotebookPanel:not(.lm-mod-hidden) .jp-CodeCell .jp-InputPrompt'
        )
      );
      return prompts.length > 0 && prompts.every(p => /\[\d+\]/.test(p.textContent ?? ''));
    },
    undefined,
    { timeout: 120000 }
  );
  await waitKernelIdle(page);
}

export async function palette(page: Page, command: string): Promise<void> {
  const input = page.locator('.lm-CommandPalette-input');
  const item = page
    .locator('.lm-CommandPalette-item:visible .lm-CommandPalette-itemLabel', { hasText: command })
    .first();
  // Right after Run All the lab can take the focus back, which loses the shortcut or closes the
  // palette just opened (seen in CI, both ways); so each step is retried, the later attempts
  // through the View menu's item.
  for (let attempt = 0; ; attempt++) {
    try {
      if (attempt === 0) {
        await page.keyboard.press('Control+Shift+C');
      } else if (!(await input.isVisible())) {
        await menu(page, 'View', 'Activate Command Palette');
      }
      await input.waitFor({ state: 'visible', timeout: 5000 });
      await input.fill(command, { timeout: 5000 });
      await item.click({ timeout: 5000 });
      return;
    } catch (e) {
      if (attempt >= 3) {
        throw e;
      }
    }
  }
}

export async function setTheme(
  page: Page,
  theme: 'JupyterLab Light' | 'JupyterLab Dark'
): Promise<void> {
  const already = await page.evaluate(t => document.body.dataset.jpThemeName === t, theme);
  if (already) {
    return;
  }
  const before = await page.evaluate(() =>
    getComputedStyle(document.body).getPropertyValue('--jp-layout-color1').trim()
  );
  await menu(page, 'Settings', 'Theme', theme);
  await page.waitForFunction(t => document.body.dataset.jpThemeName === t, theme, {
    timeout: 30000
  });
  // The theme's stylesheet loads after the attribute changes: wait until its colours apply.
  await page.waitForFunction(
    b => getComputedStyle(document.body).getPropertyValue('--jp-layout-color1').trim() !== b,
    before,
    { timeout: 30000 }
  );
  await page.waitForTimeout(300);
}

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/**
 * Types code into a new cell at the end of the notebook, runs it and returns the text of the
 * output matching `expect`. The cell (and the empty one Shift+Enter made) go again, so that the
 * notebook, saved and run again later, holds only its own cells.
 */
export async function runCell(
  page: Page,
  code: string,
  expect: RegExp,
  timeout = 60000
): Promise<string> {
  await page.locator('.jp-NotebookPanel .jp-CodeCell').last().click();
  await page.keyboard.press('Escape');
  await page.keyboard.press('b');
  await page.keyboard.press('Enter');
  await page.keyboard.insertText(code);
  await page.keyboard.press('Shift+Enter');
  const out = page.locator('.jp-NotebookPanel .jp-OutputArea-output', { hasText: expect }).last();
  await out.waitFor({ timeout });
  const text = (await out.textContent()) ?? '';
  await page
    .locator('.jp-NotebookPanel .jp-CodeCell', { hasText: code.split('\n')[0] })
    .last()
    .click();
  await page.keyboard.press('Escape');
  for (let i = 0; i < 2; i++) {
    await page.keyboard.press('Shift+ArrowDown');
  }
  await page.keyboard.press('d');
  await page.keyboard.press('d');
  return text;
}

/**
 * Closes the notifications, which JupyterLab shows over the bottom of the right sidebar (their
 * timers pause while the headless window has no focus, so they are closed by their button).
 */
export async function dismissToasts(page: Page): Promise<void> {
  const close = page.locator('#react-toastify-container .jp-Notification-Toast-Close');
  for (let i = 0; i < 10 && (await close.count()) > 0; i++) {
    await close
      .first()
      .click({ timeout: 2000 })
      .catch(() => undefined);
  }
  try {
    await page.locator('.Toastify__toast').first().waitFor({ state: 'detached', timeout: 10000 });
  } catch {
    const left = await page.locator('#react-toastify-container').innerHTML();
    throw new Error(`notifications still shown: ${JSON.stringify(left)}`);
  }
}

/**
 * The contrast ratio of an element's text against the background it is drawn on (the first
 * opaque background up its ancestors, with translucent ones composited over it), as WCAG 2.1
 * defines it (Success Criterion 1.4.3, "relative luminance" and "contrast ratio"): (L1 + 0.05) /
 * (L2 + 0.05) with L = 0.2126 R + 0.7152 G + 0.0722 B of the linearised sRGB channels. Colours are
 * resolved by the browser itself (painted on a canvas), whatever CSS syntax produced them.
 */
export async function textContrast(target: Locator): Promise<number> {
  return target.evaluate(el => {
    const ctx = document.createElement('canvas').getContext('2d', { willReadFrequently: true })!;
    const rgba = (css: string): number[] => {
      ctx.clearRect(0, 0, 1, 1);
      ctx.fillStyle = css;
      ctx.fillRect(0, 0, 1, 1);
      const d = ctx.getImageData(0, 0, 1, 1).data;
      return [d[0], d[1], d[2], d[3] / 255];
    };
    const over = (top: number[], under: number[]): number[] => [
      top[0] * top[3] + under[0] * (1 - top[3]),
      top[1] * top[3] + under[1] * (1 - top[3]),
      top[2] * top[3] + under[2] * (1 - top[3]),
      1
    ];
    const layers: number[][] = [];
    for (let n: Element | null = el; n; n = n.parentElement) {
      const c = rgba(getComputedStyle(n).backgroundColor);
      if (c[3] > 0) {
        layers.push(c);
      }
      if (c[3] >= 1) {
        break;
      }
    }
    let bg = [255, 255, 255, 1];
    for (const c of layers.reverse()) {
      bg = over(c, bg);
    }
    const fg = over(rgba(getComputedStyle(el).color), bg);
    const lum = (c: number[]): number => {
      const lin = (v: number): number => {
        const s = v / 255;
        return s <= 0.04045 ? s / 12.92 : Math.pow((s + 0.055) / 1.055, 2.4);
      };
      return 0.2126 * lin(c[0]) + 0.7152 * lin(c[1]) + 0.0722 * lin(c[2]);
    };
    const [a, b] = [lum(fg), lum(bg)].sort((x, y) => y - x);
    return (a + 0.05) / (b + 0.05);
  });
}
