// Runs every suite (static checks, unit, integration, browser, package) and ends with one line
// "N passed, N failed" summed over all of them. Exit status 0 only when nothing failed.
// Usage: node scripts/test-all.mjs [suite ...]   (suites: static unit integration e2e package)
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const artifacts = path.join(root, 'test-artifacts');
fs.mkdirSync(artifacts, { recursive: true });
const bin = name => path.join(root, 'node_modules', '.bin', name);

/** A static check counts as one test: passed when the command exits 0. */
function staticChecks() {
  const checks = [
    ['tsc (extension)', bin('tsc'), ['-b', 'tsconfig.json']],
    ['tsc (core, no DOM)', bin('tsc'), ['-p', 'src/core/tsconfig.json', '--noEmit']],
    ['tsc (tests and benches)', bin('tsc'), ['-p', 'tsconfig.test.json', '--noEmit']],
    [
      'eslint',
      bin('eslint'),
      ['--no-error-on-unmatched-pattern', 'src', 'test', 'scripts', 'bench']
    ],
    [
      'prettier',
      bin('prettier'),
      [
        '--check',
        '--no-error-on-unmatched-pattern',
        'src/**/*.ts',
        'test/**/*.ts',
        'bench/**/*.ts',
        'scripts/**/*.mjs',
        'style/**/*.css',
        'schema/*.json'
      ]
    ]
  ];
  let passed = 0;
  let failed = 0;
  for (const [name, cmd, args] of checks) {
    const r = spawnSync(cmd, args, { cwd: root, encoding: 'utf8' });
    if (r.status === 0) {
      passed++;
      console.log(`  ✓ ${name}`);
    } else {
      failed++;
      console.log(`  ✗ ${name}\n${(r.stdout + r.stderr).split('\n').slice(0, 40).join('\n')}`);
    }
  }
  return { passed, failed };
}

/** Runs jest with a config; counts its tests, and any file that failed to run as one failure. */
function jest(config) {
  const out = path.join(artifacts, `jest-${config}.json`);
  fs.rmSync(out, { force: true });
  spawnSync(bin('jest'), ['-c', `jest.${config}.config.js`, '--json', `--outputFile=${out}`], {
    cwd: root,
    stdio: 'inherit',
    env: { ...process.env, FORCE_COLOR: '0' }
  });
  if (!fs.existsSync(out)) {
    return { passed: 0, failed: 1, note: 'jest produced no report' };
  }
  const report = JSON.parse(fs.readFileSync(out, 'utf8'));
  const broken = report.testResults.filter(
    r => r.status === 'failed' && r.assertionResults.length === 0
  ).length;
  return {
    passed: report.numPassedTests,
    failed: report.numFailedTests + broken,
    skipped: report.numPendingTests
  };
}

const suites = {
  static: staticChecks,
  unit: () => jest('unit'),
  integration: () => jest('integration'),
  e2e: () => jest('e2e'),
  package: () => jest('package')
};
const wanted = process.argv.slice(2).length ? process.argv.slice(2) : Object.keys(suites);
const rows = [];
let passed = 0;
let failed = 0;
let skipped = 0;
for (const name of wanted) {
  if (!suites[name]) {
    console.error(`unknown suite ${name}; known: ${Object.keys(suites).join(' ')}`);
    process.exit(2);
  }
  console.log(`\n=== suite: ${name}`);
  const start = Date.now();
  const r = suites[name]();
  const seconds = (Date.now() - start) / 1000;
  rows.push({ name, ...r, seconds });
  passed += r.passed;
  failed += r.failed;
  skipped += r.skipped ?? 0;
}
console.log('\nsuite        passed  failed  skipped  wall time');
for (const r of rows) {
  console.log(
    `${r.name.padEnd(12)} ${String(r.passed).padStart(6)}  ${String(r.failed).padStart(6)}  ${String(r.skipped ?? 0).padStart(7)}  ${r.seconds.toFixed(1).padStart(7)} s${r.note ? '  ' + r.note : ''}`
  );
}
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed === 0 ? 0 : 1);
