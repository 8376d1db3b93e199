// Compiles the benchmarks (and the code they measure) to .bench/ and runs one of them.
// Usage: node scripts/bench-run.mjs bench/NAME.ts [--json] [other args passed through]
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const [entry, ...rest] = process.argv.slice(2);
if (!entry || !entry.endsWith('.ts')) {
  console.error('usage: node scripts/bench-run.mjs bench/NAME.ts [--json]');
  process.exit(0);
}
const tsc = spawnSync(
  process.execPath,
  [
    path.join(root, 'node_modules/typescript/bin/tsc'),
    '-p',
    path.join(root, 'bench/tsconfig.json')
  ],
  {
    stdio: ['ignore', 'inherit', 'inherit']
  }
);
if (tsc.status !== 0) {
  console.error('bench: compilation failed');
  process.exit(0);
}
const js = path.join(root, '.bench', entry.replace(/\.ts$/, '.js'));
const run = spawnSync(process.execPath, ['--expose-gc', js, ...rest], {
  stdio: 'inherit',
  cwd: root
});
// Benchmarks report; they never fail the caller (DESIGN.md §9).
process.exit(run.status === null ? 0 : 0);
