// Builds the prebuilt (federated) extension into perpend/labextension with @jupyterlab/builder's
// build-labextension, against the core manifest of the JupyterLab installed in .venv (its staging
// package.json) so the build matches the JupyterLab that runs; falls back to @jupyterlab/core-meta.
// Then installs it into .venv's labextensions folder exactly where the wheel puts it.
// Usage: node scripts/build-labextension.mjs [--development] [--no-install]
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const args = new Set(process.argv.slice(2));
const venv = path.join(root, '.venv');

function coreManifestDir() {
  const pyRun = spawnSync(
    path.join(venv, 'bin', 'python'),
    [
      '-c',
      'import jupyterlab, os; print(os.path.join(os.path.dirname(jupyterlab.__file__), "staging"))'
    ],
    { encoding: 'utf8' }
  );
  const staging = pyRun.status === 0 ? pyRun.stdout.trim() : '';
  if (staging && fs.existsSync(path.join(staging, 'package.json'))) {
    return staging;
  }
  // Fallback: the published core manifest of the same JupyterLab minor.
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-core-'));
  const meta = path.join(root, 'node_modules', '@jupyterlab', 'core-meta', 'core.package.json');
  if (!fs.existsSync(meta)) {
    console.error(
      'build-labextension: neither .venv JupyterLab staging nor @jupyterlab/core-meta found'
    );
    process.exit(1);
  }
  fs.copyFileSync(meta, path.join(dir, 'package.json'));
  return dir;
}

const builder = path.join(
  root,
  'node_modules',
  '@jupyterlab',
  'builder',
  'lib',
  'build-labextension.js'
);
const buildArgs = [builder, '--core-path', coreManifestDir()];
if (args.has('--development')) {
  buildArgs.push('--development');
}
buildArgs.push(root);
const run = spawnSync(process.execPath, buildArgs, { stdio: 'inherit', cwd: root });
if (run.status !== 0) {
  process.exit(run.status ?? 1);
}

if (!args.has('--no-install') && fs.existsSync(venv)) {
  const source = path.join(root, 'perpend', 'labextension');
  const target = path.join(venv, 'share', 'jupyter', 'labextensions', 'perpend');
  fs.rmSync(target, { recursive: true, force: true });
  fs.mkdirSync(path.dirname(target), { recursive: true });
  fs.cpSync(source, target, { recursive: true });
  console.log(`installed the prebuilt extension into .venv/share/jupyter/labextensions/perpend`);
}
