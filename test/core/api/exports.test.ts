/**
 * Every value the core's public index exports is documented in the README's "Core API" section
 * (issue 9, point 4; the project's rule that the README stays true), and the argument checks of
 * errors.ts stay internal.
 */
import * as fs from 'fs';
import * as path from 'path';
import * as core from '../../../src/core';

const readme = fs.readFileSync(path.resolve(__dirname, '../../../README.md'), 'utf8');
const api = readme.slice(readme.indexOf('## Core API'), readme.indexOf('## Performance'));

test('the README has a Core API section before Performance', () => {
  expect(api.length).toBeGreaterThan(1000);
});

test('every runtime export of src/core/index.ts is named in the README Core API section', () => {
  const missing = Object.keys(core).filter(k => !new RegExp(`\\b${k}\\b`).test(api));
  expect(missing).toEqual([]);
});

test('internal helpers are not exported', () => {
  for (const name of [
    'describe',
    'checkNumber',
    'checkInteger',
    'checkInterval',
    'checkFinite',
    'checkFloatArray',
    'checkSameLength',
    'isVectorInput',
    'asVector',
    'toFlat'
  ]) {
    expect(Object.keys(core)).not.toContain(name);
  }
});
