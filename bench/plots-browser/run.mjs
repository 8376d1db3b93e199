/* global window, document */
// Browser cases of `npm run bench:plots`: bundles ./page.mjs (webpack, from the compiled lib/),
// opens it in Debian's chromium (playwright-core, headless, a fresh profile), times a draw of
// 1e5, 1e6 and 1e7 samples and a zoom to 1,000 samples, and with --screens saves a screenshot
// of every view in JupyterLab's light and dark themes to test-artifacts/screenshots/.
// Prints one JSON line per case (DESIGN §9); exits 0 whatever it measures.
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const out = path.join(root, '.bench', 'plots-browser');
const screens = process.argv.includes('--screens');
const REPEATS = 5;

function bundle() {
  fs.mkdirSync(out, { recursive: true });
  // The page imports the compiled extension (lib/): bring it up to date first.
  const tsc = spawnSync(
    process.execPath,
    [path.join(root, 'node_modules/typescript/bin/tsc'), '-b', path.join(root, 'tsconfig.json')],
    { cwd: root, encoding: 'utf8' }
  );
  if (tsc.status !== 0) {
    throw new Error(`tsc -b failed:\n${tsc.stdout}\n${tsc.stderr}`);
  }
  const config = path.join(out, 'webpack.config.cjs');
  fs.writeFileSync(
    config,
    `module.exports = {
  mode: 'development',
  devtool: false,
  entry: ${JSON.stringify(path.join(root, 'bench/plots-browser/page.mjs'))},
  output: { path: ${JSON.stringify(out)}, filename: 'page.js', publicPath: '' },
  module: { rules: [{ test: /\\.css$/, use: ['style-loader', 'css-loader'] }] },
  resolve: { modules: [${JSON.stringify(path.join(root, 'node_modules'))}] },
  performance: { hints: false }
};
`
  );
  const r = spawnSync(
    process.execPath,
    [path.join(root, 'node_modules/webpack-cli/bin/cli.js'), '--config', config],
    { cwd: root, encoding: 'utf8' }
  );
  if (r.status !== 0) {
    throw new Error(`webpack failed:\n${r.stdout}\n${r.stderr}`);
  }
  const themes = path.join(root, '.venv/share/jupyter/lab/themes/@jupyterlab');
  for (const t of ['light', 'dark']) {
    fs.copyFileSync(
      path.join(themes, `theme-${t}-extension/index.css`),
      path.join(out, `theme-${t}.css`)
    );
  }
  fs.writeFileSync(
    path.join(out, 'page.html'),
    `<!doctype html><html><head><meta charset="utf-8">
<link id="theme" rel="stylesheet" href="theme-light.css">
<style>html, body { margin: 0; background: var(--jp-layout-color1); }
#host { width: 900px; height: 560px; position: relative; }</style></head>
<body data-jp-theme-name="JupyterLab Light"><div id="host"></div><script src="page.js"></script></body></html>`
  );
}

async function main() {
  bundle();
  const { chromium } = await import('playwright-core');
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'pp-plots-'));
  const ctx = await chromium.launchPersistentContext(profile, {
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--allow-file-access-from-files'],
    viewport: { width: 900, height: 560 }
  });
  const errors = [];
  try {
    const page = ctx.pages()[0] ?? (await ctx.newPage());
    page.on('pageerror', e => errors.push(String(e)));
    page.on('console', m => {
      if (m.type() === 'error') {
        errors.push(m.text());
      }
    });
    await page.goto('file://' + path.join(out, 'page.html'));
    await page.waitForSelector('body[data-ready="1"]', { timeout: 120000 });
    if (screens) {
      const dir = path.join(root, 'test-artifacts', 'screenshots');
      fs.mkdirSync(dir, { recursive: true });
      const shots = [
        ['qr', 'signals'],
        ['qr', 'learning'],
        ['qr', 'response'],
        ['qr', 'trajectories'],
        ['qr', 'spectrum'],
        ['removal', 'signals'],
        ['removal', 'spectrum'],
        ['removal', 'energy'],
        ['eq', 'constellation'],
        ['eq', 'signals', 'polar'],
        ['eq', 'signals', 'cartesian'],
        ['compare']
      ];
      for (const theme of ['light', 'dark']) {
        await page.evaluate(t => {
          document.getElementById('theme').setAttribute('href', `theme-${t}.css`);
          document.body.dataset.jpThemeName =
            t === 'light' ? 'JupyterLab Light' : 'JupyterLab Dark';
        }, theme);
        await page.waitForTimeout(300);
        for (const [runId, view, as] of shots) {
          if (runId === 'compare') {
            await page.evaluate(() => window.pp.showCompare());
          } else {
            await page.evaluate(([r, v, a]) => window.pp.showRun(r, v, a), [runId, view, as]);
          }
          await page.waitForFunction(
            () =>
              window.pp.drawnLines() > 0 ||
              document.querySelector(
                '.pp-PlotPane-graph .barlayer .trace, .pp-PlotPane-graph .scatterlayer .points path'
              ),
            null,
            { timeout: 60000 }
          );
          await page.waitForTimeout(250);
          const name = `plots-${runId}-${view ?? 'curves'}${as ? '-' + as : ''}-${theme}.png`;
          await page.screenshot({ path: path.join(dir, name) });
          console.error(`screenshot ${name}`);
        }
      }
    }
    if (screens) {
      // The user's paths with the real plotly: a theme switch redraws in the new colours, and a
      // drag-zoom to 1000 samples of a 40000-sample trace draws every sample of the range.
      await page.evaluate(() => {
        document.getElementById('theme').setAttribute('href', 'theme-light.css');
        document.body.dataset.jpThemeName = 'JupyterLab Light';
      });
      await page.evaluate(() => window.pp.showRun('qr', 'signals'));
      await page.waitForFunction(() => window.pp.drawnLines() > 0);
      const light = await page.evaluate(() => window.pp.paperColor());
      await page.evaluate(() => {
        document.getElementById('theme').setAttribute('href', 'theme-dark.css');
        document.body.dataset.jpThemeName = 'JupyterLab Dark';
      });
      await page.waitForTimeout(800);
      const dark = await page.evaluate(() => window.pp.paperColor());
      console.error(
        `check theme: paper ${light} → ${dark} (${light !== dark ? 'redrawn' : 'NOT REDRAWN'})`
      );
      const z = await page.evaluate(() => window.pp.zoomCheck(2.0, 2.1249));
      console.error(
        `check zoom: points per trace ${z.before.join('/')} → ${z.after.join('/')}, x ${z.x0} … ${z.x1} s`
      );
      await page.screenshot({
        path: path.join(root, 'test-artifacts', 'screenshots', 'plots-qr-signals-zoomed-dark.png')
      });
    }
    if (!process.argv.includes('--no-timing')) {
      for (const samples of [1e5, 1e6, 1e7]) {
        const r = await page.evaluate(([n, k]) => window.pp.benchDraw(n, k), [samples, REPEATS]);
        const row = {
          name: 'draw',
          samples,
          decimate_ms: +r.decimate_ms.toFixed(1),
          decimate_again_ms: +r.decimate_again_ms.toFixed(1),
          draw_ms: +r.draw_ms.toFixed(1),
          target: samples === 1e6 ? 'draw_ms < 100' : samples === 1e7 ? 'draw_ms < 300' : undefined,
          repeats: REPEATS
        };
        if (row.target) {
          row.met = row.draw_ms < (samples === 1e6 ? 100 : 300);
        } else {
          delete row.target;
        }
        console.log(JSON.stringify(row));
        if (samples === 1e7) {
          console.log(
            JSON.stringify({
              name: 'zoom',
              samples,
              visible: 1000,
              redraw_ms: +r.redraw_ms.toFixed(1),
              target: 'redraw_ms < 100',
              met: r.redraw_ms < 100,
              repeats: REPEATS
            })
          );
        }
      }
    }
  } finally {
    await ctx.close();
    fs.rmSync(profile, { recursive: true, force: true });
  }
  if (errors.length > 0) {
    console.error(`browser errors:\n${errors.join('\n')}`);
  }
}

main().catch(err => {
  console.error(`bench:plots browser cases failed: ${err instanceof Error ? err.stack : err}`);
  process.exit(0);
});
