/**
 * Runs a body of plain JavaScript in a child Node process with the core transpiled to CommonJS
 * (as test/core/filters/helpers.ts `runInChild` does, with esModuleInterop so that the default
 * import of fft.js, a CommonJS module, resolves as it does in the build). The body can
 * `require('./core/dsp')` and `require('./helpers')` (the filters' test helpers: Rng).
 */
import { spawnSync } from 'child_process';
import * as fs from 'fs';
import * as os from 'os';
import * as path from 'path';
import * as ts from 'typescript';

const ROOT = path.resolve(__dirname, '../../..');

export function runCoreInChild(body: string, nodeFlags: string[] = []): string {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'perpend-dsp-child-'));
  try {
    const emit = (file: string, dest: string) => {
      const out = ts.transpileModule(fs.readFileSync(file, 'utf8'), {
        compilerOptions: {
          module: ts.ModuleKind.CommonJS,
          target: ts.ScriptTarget.ES2020,
          esModuleInterop: true
        }
      }).outputText;
      fs.mkdirSync(path.dirname(dest), { recursive: true });
      fs.writeFileSync(dest, out);
    };
    const src = path.join(ROOT, 'src', 'core');
    const walk = (d: string) => {
      for (const ent of fs.readdirSync(d, { withFileTypes: true })) {
        const p = path.join(d, ent.name);
        if (ent.isDirectory()) {
          walk(p);
        } else if (ent.name.endsWith('.ts') && !ent.name.endsWith('.d.ts')) {
          emit(p, path.join(dir, 'core', path.relative(src, p).replace(/\.ts$/, '.js')));
        }
      }
    };
    walk(src);
    emit(path.join(ROOT, 'test', 'core', 'filters', 'helpers.ts'), path.join(dir, 'helpers.js'));
    fs.writeFileSync(path.join(dir, 'child.js'), body);
    const r = spawnSync(process.execPath, [...nodeFlags, 'child.js'], {
      cwd: dir,
      encoding: 'utf8',
      maxBuffer: 256 * 1024 * 1024,
      env: { ...process.env, NODE_PATH: path.join(ROOT, 'node_modules') }
    });
    if (r.status !== 0) {
      throw new Error(`child failed (${r.status}): ${r.stderr}`);
    }
    return r.stdout;
  } finally {
    fs.rmSync(dir, { recursive: true, force: true });
  }
}
