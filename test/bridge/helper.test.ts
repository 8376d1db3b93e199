/**
 * The kernel-side helper as text: ASCII only (so its JSON-escaped form is an exact Python
 * literal), and parsed by the venv's Python itself ("Python Language Reference" §10 grammar,
 * via ast.parse) both as a module and as the one-statement install code.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { HELPER_MODULE, helperSource, installCode } from '../../src/bridge/helper';

const PYTHON = path.resolve(__dirname, '../../.venv/bin/python');

describe('helper source', () => {
  it('is ASCII and parses as Python; the install code is one expression statement binding no name', () => {
    expect(
      Array.from(helperSource()).every(c => c === '\n' || c === '\t' || (c >= ' ' && c <= '~'))
    ).toBe(true);
    const script = [
      'import ast, json, sys',
      'd = json.load(sys.stdin)',
      'ast.parse(d["src"])',
      'tree = ast.parse(d["install"])',
      'ok = len(tree.body) == 1 and isinstance(tree.body[0], ast.Expr)',
      'stores = [n.id for n in ast.walk(tree) if isinstance(n, ast.Name) and isinstance(n.ctx, ast.Store)]',
      'lit = [n.value for n in ast.walk(tree) if isinstance(n, ast.Constant) and isinstance(n.value, str) and len(n.value) > 1000]',
      'print(json.dumps({"ok": ok, "stores": stores, "same": lit == [d["src"]]}))'
    ].join('\n');
    const r = spawnSync(PYTHON, ['-c', script], {
      input: JSON.stringify({ src: helperSource(), install: installCode() }),
      encoding: 'utf8'
    });
    expect(r.stderr).toBe('');
    expect(JSON.parse(r.stdout)).toEqual({ ok: true, stores: [], same: true });
    expect(installCode()).toContain(JSON.stringify(HELPER_MODULE));
    expect(installCode()).toBe(installCode());
  });
});
