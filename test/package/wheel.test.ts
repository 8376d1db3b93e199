/**
 * The wheel carries the prebuilt extension: built with hatchling (pip wheel), installed into a
 * fresh virtual environment with JupyterLab, and listed by `jupyter labextension list` as enabled
 * and OK — what a user with their own JupyterLab 4 gets from `pip install perpend-*.whl`.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';

const REPO = path.resolve(__dirname, '../..');
const OUT = path.join(REPO, 'test-artifacts', 'wheel');
const VENV = path.join(OUT, 'venv');

function run(cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env): string {
  const r = spawnSync(cmd, args, { cwd: REPO, encoding: 'utf8', env, maxBuffer: 64 << 20 });
  if (r.status !== 0) {
    throw new Error(
      `${path.basename(cmd)} ${args.join(' ')} failed (${r.status}):\n${r.stdout}\n${r.stderr}`
    );
  }
  return r.stdout + r.stderr;
}

let wheel = '';

beforeAll(() => {
  fs.rmSync(OUT, { recursive: true, force: true });
  fs.mkdirSync(OUT, { recursive: true });
  expect(fs.existsSync(path.join(REPO, 'perpend', 'labextension', 'package.json'))).toBe(true);
  // --retries 0: only the machine's local wheel store is reachable here (DESIGN.md §5).
  run(path.join(REPO, '.venv', 'bin', 'pip'), [
    'wheel',
    '.',
    '--no-deps',
    '--retries',
    '0',
    '-q',
    '-w',
    OUT
  ]);
  wheel = fs.readdirSync(OUT).find(f => f.endsWith('.whl')) ?? '';
});

test('the wheel holds the prebuilt extension in its shared data', () => {
  expect(wheel).toMatch(/^perpend-0\.1\.0-py3-none-any\.whl$/);
  const listing = run(path.join(REPO, '.venv', 'bin', 'python'), [
    '-c',
    'import sys, zipfile; print("\\n".join(zipfile.ZipFile(sys.argv[1]).namelist()))',
    path.join(OUT, wheel)
  ]);
  const data = 'perpend-0.1.0.data/data/share/jupyter/labextensions/perpend/';
  expect(listing).toContain(`${data}package.json`);
  expect(listing).toContain(`${data}install.json`);
  expect(listing).toMatch(
    new RegExp(`${data.replace(/[.]/g, '\\.')}static/remoteEntry\\.[0-9a-f]+\\.js`)
  );
  expect(listing).toContain(`${data}schemas/perpend/plugin.json`);
  // the server extension (kernel websockets without Nagle's delay) and its switch
  expect(listing).toContain('perpend/server.py');
  expect(listing).toContain(
    'perpend-0.1.0.data/data/etc/jupyter/jupyter_server_config.d/perpend.json'
  );
});

test('installed into a fresh venv with JupyterLab, it is listed as enabled and OK', () => {
  run('python3', ['-m', 'venv', VENV]);
  const pip = path.join(VENV, 'bin', 'pip');
  run(pip, ['install', '--retries', '0', '-q', 'jupyterlab==4.6.4', path.join(OUT, wheel)]);
  const env = {
    ...process.env,
    JUPYTER_CONFIG_DIR: path.join(OUT, 'config'),
    JUPYTER_DATA_DIR: path.join(OUT, 'data')
  };
  // jupyter colours "enabled" and "OK" with ANSI escapes even when not on a terminal.
  const ansi = new RegExp(String.fromCharCode(27) + '\\[[0-9;]*m', 'g');
  const listing = run(path.join(VENV, 'bin', 'jupyter'), ['labextension', 'list'], env).replace(
    ansi,
    ''
  );
  expect(listing).toMatch(/perpend v0\.1\.0 enabled OK \(python, perpend\)/);
  const server = run(
    path.join(VENV, 'bin', 'jupyter'),
    ['server', 'extension', 'list'],
    env
  ).replace(ansi, '');
  expect(server).toMatch(/perpend enabled/);
  expect(server).toMatch(/perpend 0\.1\.0 OK/);
});
