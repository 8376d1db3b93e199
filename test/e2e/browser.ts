/**
 * Debian's chromium, headless, driven by playwright-core with a fresh profile per test file; it
 * records every console error, page error and HTTP status >= 400 so that a test can fail on any
 * that is not on its own allow-list.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { ARTIFACTS, STATE_FILE, type ILabState } from './lab-server';

export const SCREENSHOTS = path.join(ARTIFACTS, 'screenshots');

const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync'
];

export interface IFault {
  kind: 'console' | 'pageerror' | 'http';
  text: string;
}

export class LabBrowser {
  static async open(): Promise<LabBrowser> {
    const state = JSON.parse(fs.readFileSync(STATE_FILE, 'utf8')) as ILabState;
    const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-chromium-'));
    const context = await chromium.launchPersistentContext(profile, {
      executablePath: '/usr/bin/chromium',
      headless: true,
      args: CHROMIUM_ARGS,
      viewport: { width: 1400, height: 860 }
    });
    const page = context.pages()[0] ?? (await context.newPage());
    return new LabBrowser(state, context, page, profile);
  }

  private constructor(
    readonly state: ILabState,
    readonly context: BrowserContext,
    readonly page: Page,
    private readonly _profile: string
  ) {
    page.on('console', msg => {
      if (msg.type() === 'error') {
        this.faults.push({ kind: 'console', text: msg.text() });
      }
    });
    page.on('pageerror', err => this.faults.push({ kind: 'pageerror', text: String(err) }));
    page.on('response', r => {
      if (r.status() >= 400) {
        this.faults.push({
          kind: 'http',
          text: `${r.status()} ${r.request().method()} ${r.url()}`
        });
      }
    });
  }

  readonly faults: IFault[] = [];

  /** The faults not matched by any pattern of the allow-list. */
  unexpectedFaults(allow: RegExp[] = []): IFault[] {
    return this.faults.filter(f => !allow.some(re => re.test(f.text)));
  }

  url(pathname: string): string {
    const sep = pathname.includes('?') ? '&' : '?';
    return `${this.state.baseUrl}${pathname}${sep}token=${this.state.token}`;
  }

  async screenshot(name: string): Promise<string> {
    fs.mkdirSync(SCREENSHOTS, { recursive: true });
    const file = path.join(SCREENSHOTS, `${name}.png`);
    await this.page.screenshot({ path: file });
    return file;
  }

  async close(): Promise<void> {
    await this.context.close();
    fs.rmSync(this._profile, { recursive: true, force: true });
  }
}
