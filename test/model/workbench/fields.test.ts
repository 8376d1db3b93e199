/**
 * The forms as data: every field of every tool points at a parameter the tool's draft has, the
 * drafts pass the parameter rules as they come, and the number-list syntax parses as documented.
 */
import { BUILTIN_DEFAULTS, basisDraft, draftFor } from '../../../src/model/workbench/drafts';
import { fieldsOf, getPath, parseNumberList, setPath } from '../../../src/model/workbench/fields';
import { checkParams } from '../../../src/model/workbench/rules';
import { TOOLS, type SetupParams } from '../../../src/model/workbench/setup';
import { trans } from './fixtures';

describe('tool forms', () => {
  it.each(TOOLS)('every field of %s names a parameter of its draft', tool => {
    let draft: SetupParams = draftFor(tool, BUILTIN_DEFAULTS, { fsName: 'fs', f0: 60 });
    for (const f of fieldsOf(tool)) {
      if (f.path.startsWith('basis.') && draft.tool === 'removal') {
        // Fields of the other basis kinds: switch the draft to that kind and look again.
        for (const kind of ['harmonics', 'array', 'reference', 'matrix'] as const) {
          const d = { ...draft, basis: basisDraft(kind) };
          if (!f.when || f.when(d)) {
            expect(getPath(d, f.path)).not.toBeUndefined();
          }
        }
        continue;
      }
      if (f.optional) {
        // An optional source (the true response) is absent from a new draft: none chosen.
        expect(getPath(draft, f.path)).toBeUndefined();
        continue;
      }
      expect({ path: f.path, value: getPath(draft, f.path) }).not.toEqual({
        path: f.path,
        value: undefined
      });
      draft = setPath(draft, f.path, getPath(draft, f.path));
    }
  });

  it.each(TOOLS)('the %s draft passes the parameter rules as it comes', tool => {
    expect(checkParams(trans, draftFor(tool, BUILTIN_DEFAULTS, { fsName: 'fs' }))).toEqual([]);
  });

  it('prefills f0 and the sample-rate variable from the kernel', () => {
    const d = draftFor('removal', BUILTIN_DEFAULTS, { fsName: 'fs', f0: 60 });
    expect(d.tool === 'removal' && d.basis).toEqual({
      kind: 'harmonics',
      f0: 60,
      count: 5,
      fs: { kind: 'variable', name: 'fs' }
    });
  });

  it('setPath copies along the path and leaves the original alone', () => {
    const a = { x: { y: 1, z: 2 }, w: 3 };
    const b = setPath(a, 'x.y', 5);
    expect(b).toEqual({ x: { y: 5, z: 2 }, w: 3 });
    expect(a.x.y).toBe(1);
    expect(b.w).toBe(3);
  });
});

describe('number lists', () => {
  it('reads comma, space or semicolon separated values', () => {
    expect(parseNumberList('0.99, 0.995 0.999;1')).toEqual([0.99, 0.995, 0.999, 1]);
    expect(parseNumberList('  ')).toEqual([]);
  });
  it('reads start:stop:n as n evenly spaced values, ends exact', () => {
    expect(parseNumberList('0.99:0.999:4')).toEqual([0.99, 0.993, 0.996, 0.999]);
    expect(parseNumberList('8:64:8')).toEqual([8, 16, 24, 32, 40, 48, 56, 64]);
  });
  it('says what is wrong', () => {
    expect(parseNumberList('0.9, abc')).toBe('"abc" is not a number');
    expect(parseNumberList('1:2:1')).toMatch(/start:stop:n/);
    expect(parseNumberList('1:2:x')).toMatch(/start:stop:n/);
  });
});
