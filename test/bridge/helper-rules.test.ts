/**
 * The kernel-side helper's rules, run by the venv's Python on the helper's own source (no
 * kernel): looking at the user's objects runs none of their code, attribute paths follow
 * Python's lookup rules without invoking a descriptor ("Python Language Reference" §3.3.2.4,
 * invoking descriptors: data descriptors on the type first, then the instance's __dict__,
 * then other class attributes, then __getattr__), and names are reserved as the front end
 * reserves them.
 *
 * Every user object here records every call into it (`calls`), including its metaclass's
 * hooks, so a test fails when the helper runs any of them. The same objects are used against
 * a real kernel in test/integration/harden.test.ts.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { helperSource } from '../../src/bridge/helper';
import { reservedName } from '../../src/bridge/names';
import { RECORDING_OBJECTS } from './recording-objects';

const PYTHON = path.resolve(__dirname, '../../.venv/bin/python');

function runPython(body: string): Record<string, unknown> {
  const script = [
    'import json, sys, types',
    'src = json.load(sys.stdin)["src"]',
    'H = types.ModuleType("_perpend_test_helper")',
    'H.__dict__["__builtins__"] = __builtins__',
    'exec(src, H.__dict__)',
    'exec(json.loads(sys.argv[1]), globals())',
    body,
    'print(json.dumps(out))'
  ].join('\n');
  const r = spawnSync(PYTHON, ['-c', script, JSON.stringify(RECORDING_OBJECTS)], {
    input: JSON.stringify({ src: helperSource() }),
    encoding: 'utf8'
  });
  if (r.status !== 0) {
    throw new Error(r.stderr);
  }
  return JSON.parse(r.stdout) as Record<string, unknown>;
}

/** Python: `attempt(f)` is f()'s value, or the helper's refusal as [code, detail]. */
const ATTEMPT = [
  'def attempt(f):',
  '    try:',
  '        v = f()',
  '        return v if type(v) in (int, float, str, list, dict, type(None)) else repr(type(v))',
  '    except H.Err as e:',
  '        return [e.code, e.detail]'
].join('\n');

describe('the helper looks at user objects without running their code', () => {
  it('describes arrays and skips the rest by type alone: no call into any object', () => {
    const out = runPython(
      [
        'out = {}',
        'for name in ["rec", "slotted", "own", "lazy", "fsub", "sub", "sub1", "masked", "unmasked", "Cfg", "MetaCfg"]:',
        '    out[name] = H.info(globals()[name])',
        'out["recorder_list"] = H.info([Recorder(), Recorder()])',
        'out["fsub_list"] = H.info([fsub, fsub])',
        'out["calls"] = calls'
      ].join('\n')
    );
    expect(out.calls).toEqual([]);
    for (const n of [
      'rec',
      'slotted',
      'own',
      'lazy',
      'fsub',
      'Cfg',
      'MetaCfg',
      'recorder_list',
      'fsub_list'
    ]) {
      expect([n, out[n]]).toEqual([n, null]);
    }
    // The subclass is described by its stored array, not its shape/dtype properties.
    expect(out.sub).toMatchObject({
      shape: [4],
      dtype: 'float64',
      notes: ['subclass'],
      type: 'Sub'
    });
    // numpy.ma: one masked entry makes it unreadable; an unmasked one reads.
    expect(out.masked).toMatchObject({ shape: [3], readable: false, masked: 1 });
    expect(out.unmasked).toMatchObject({ readable: true, masked: 0 });
  });

  it('prepares a subclass as its plain data and refuses the rest without calling them', () => {
    const out = runPython(
      [
        ATTEMPT,
        'out = {}',
        'out["sub"] = attempt(lambda: H.prepare(sub, 1 << 20)[0])',
        'out["lazy"] = attempt(lambda: H.prepare(lazy, 1 << 20))',
        'out["rec"] = attempt(lambda: H.prepare(rec, 1 << 20))',
        'out["fsub"] = attempt(lambda: H.prepare(fsub, 1 << 20))',
        'out["masked"] = attempt(lambda: H.prepare(masked, 1 << 20))',
        'out["unmasked"] = attempt(lambda: H.prepare(unmasked, 1 << 20)[0])',
        'out["changed"] = attempt(lambda: H.check_changed(sub, {"shape": [3], "dtype": "float64"}))',
        'out["changed_type"] = attempt(lambda: H.check_changed(lazy, {"shape": [3], "dtype": "float64"}))',
        'out["same"] = attempt(lambda: H.check_changed(sub, {"shape": [4], "dtype": "float64"}))',
        'out["calls"] = calls'
      ].join('\n')
    );
    expect(out.calls).toEqual([]);
    expect(out.sub).toMatchObject({ shape: [4], dtype: 'float64', nbytes: 32 });
    expect(out.lazy).toEqual(['not-array', { type: 'LazyProxy' }]);
    expect(out.rec).toEqual(['not-array', { type: 'Rec' }]);
    expect(out.fsub).toEqual(['not-array', { type: 'FloatSub' }]);
    expect(out.masked).toEqual(['masked', { count: 1, size: 3, shape: [3] }]);
    expect(out.unmasked).toMatchObject({ shape: [2] });
    expect(out.changed).toEqual([
      'changed',
      { shape: [4], dtype: 'float64', listed_shape: [3], listed_dtype: 'float64' }
    ]);
    expect(out.changed_type).toEqual([
      'changed',
      { type: 'LazyProxy', listed_shape: [3], listed_dtype: 'float64' }
    ]);
    expect(out.same).toBeNull();
  });
});

describe('attribute paths follow Python lookup over stored values only', () => {
  it('reads instance, slot and class values; refuses properties, methods and __getattr__', () => {
    const out = runPython(
      [
        ATTEMPT,
        'out = {}',
        'for p in ["fs", "cls_rate", "rate", "broken", "method", "missing"]:',
        '    out["rec." + p] = attempt(lambda: H.stored_attr(rec, p, "rec"))',
        'for p in ["fs", "unset", "missing"]:',
        '    out["slotted." + p] = attempt(lambda: H.stored_attr(slotted, p, "slotted"))',
        'out["own.fs"] = attempt(lambda: H.stored_attr(own, "fs", "own"))',
        'out["lazy.fs"] = attempt(lambda: H.stored_attr(lazy, "fs", "lazy"))',
        'out["Cfg.fs"] = attempt(lambda: H.stored_attr(Cfg, "fs", "Cfg"))',
        'out["Cfg.make"] = attempt(lambda: H.stored_attr(Cfg, "make", "Cfg"))',
        'out["Cfg.missing"] = attempt(lambda: H.stored_attr(Cfg, "missing", "Cfg"))',
        'out["MetaCfg.fs"] = attempt(lambda: H.stored_attr(MetaCfg, "fs", "MetaCfg"))',
        'out["ns.fs"] = attempt(lambda: H.stored_attr(types.SimpleNamespace(fs=1.5), "fs", "ns"))',
        'm = types.ModuleType("m"); m.fs = 2.5',
        'out["m.fs"] = attempt(lambda: H.stored_attr(m, "fs", "m"))',
        'm.__getattr__ = lambda n: calls.append("module __getattr__") or 1.0',
        'out["m.lazy"] = attempt(lambda: H.stored_attr(m, "lazy", "m"))',
        'out["calls"] = calls'
      ].join('\n')
    );
    expect(out.calls).toEqual([]);
    expect(out['rec.fs']).toBe(48000);
    expect(out['rec.cls_rate']).toBe(44100);
    expect(out['rec.rate']).toEqual([
      'user-code',
      { why: 'property', path: 'rec', attr: 'rate', type: 'Rec' }
    ]);
    // A getter that raises AttributeError is a property all the same, not a missing name.
    expect(out['rec.broken']).toEqual([
      'user-code',
      { why: 'property', path: 'rec', attr: 'broken', type: 'Rec' }
    ]);
    expect(out['rec.method']).toEqual([
      'user-code',
      { why: 'method', path: 'rec', attr: 'method', type: 'Rec' }
    ]);
    // Rec's class defines __getattr__: a missing attribute would be computed by it.
    expect(out['rec.missing']).toEqual([
      'user-code',
      { why: 'getattr', path: 'rec', attr: 'missing', type: 'Rec' }
    ]);
    expect(out['slotted.fs']).toBe(16000);
    expect(out['slotted.unset']).toEqual([
      'not-found',
      { path: 'slotted', attr: 'unset', type: 'Slotted' }
    ]);
    expect(out['slotted.missing']).toEqual([
      'not-found',
      { path: 'slotted', attr: 'missing', type: 'Slotted' }
    ]);
    expect(out['own.fs']).toEqual([
      'user-code',
      { why: 'getattribute', path: 'own', type: 'OwnGetattribute' }
    ]);
    expect(out['lazy.fs']).toEqual([
      'user-code',
      { why: 'getattribute', path: 'lazy', type: 'LazyProxy' }
    ]);
    expect(out['Cfg.fs']).toBe(22050);
    expect(out['Cfg.make']).toEqual([
      'user-code',
      { why: 'method', path: 'Cfg', attr: 'make', type: 'Cfg' }
    ]);
    expect(out['Cfg.missing']).toEqual([
      'not-found',
      { path: 'Cfg', attr: 'missing', type: 'Cfg' }
    ]);
    // Attribute access on a class whose metaclass has its own __getattribute__ runs it.
    expect(out['MetaCfg.fs']).toEqual([
      'user-code',
      { why: 'getattribute', path: 'MetaCfg', type: 'Meta' }
    ]);
    expect(out['ns.fs']).toBe(1.5);
    expect(out['m.fs']).toBe(2.5);
    expect(out['m.lazy']).toEqual([
      'user-code',
      { why: 'getattr', path: 'm', attr: 'lazy', type: 'module' }
    ]);
  });

  it('takes numbers of built-in and numpy types only', () => {
    const out = runPython(
      [
        ATTEMPT,
        'import numpy as np',
        'out = {}',
        'cases = {"float": 48000.0, "int": 8000, "np.float32": np.float32(0.1), "np.int64": np.int64(2**53),',
        '         "np.int64 big": np.int64(2**53 + 1), "np.uint64 max": np.uint64(2**64 - 1), "int big": -(2**53) - 1,',
        '         "bool": True, "np.bool": np.bool_(True), "complex": 1j, "np.complex128": np.complex128(1),',
        '         "np.longdouble": np.longdouble(1), "fsub": fsub, "str": "48000", "recorder": Recorder()}',
        'for k, v in cases.items():',
        '    out[k] = attempt(lambda: H.number_of(v, np))',
        'out["calls"] = calls'
      ].join('\n')
    );
    expect(out.calls).toEqual([]);
    expect(out.float).toBe(48000);
    expect(out.int).toBe(8000);
    // float32(0.1) widened exactly: 0.100000001490116119384765625 (IEEE 754 binary32).
    expect(out['np.float32']).toBe(Math.fround(0.1));
    expect(out['np.int64']).toBe(2 ** 53);
    expect(out['np.int64 big']).toEqual(['int-precision', { value: '9007199254740993' }]);
    expect(out['np.uint64 max']).toEqual(['int-precision', { value: '18446744073709551615' }]);
    expect(out['int big']).toEqual(['int-precision', { value: '-9007199254740993' }]);
    expect(out.bool).toEqual(['not-scalar', { type: 'bool' }]);
    expect(out['np.bool']).toEqual(['not-scalar', { type: 'bool' }]);
    expect(out.complex).toEqual(['not-scalar', { type: 'complex' }]);
    expect(out['np.complex128']).toEqual(['not-scalar', { type: 'complex128' }]);
    expect(out['np.longdouble']).toEqual(['extended', { dtype: 'float128' }]);
    expect(out.fsub).toEqual(['user-code', { why: 'subclass', type: 'FloatSub' }]);
    expect(out.str).toEqual(['not-scalar', { type: 'str' }]);
    expect(out.recorder).toEqual(['not-scalar', { type: 'Recorder' }]);
  });
});

describe('reserved names', () => {
  it('the kernel reserves exactly the names the front end reserves', () => {
    const names = [
      '__builtins__',
      '__import__',
      '__name__',
      '__spec__',
      '__loader__',
      '__package__',
      '__x__',
      '____',
      '_____',
      'In',
      'Out',
      'get_ipython',
      'exit',
      'quit',
      '_',
      '__',
      '___',
      '_i',
      '_ii',
      '_iii',
      '_1',
      '_i23',
      '_ih',
      '_oh',
      '_dh',
      'sum',
      'open',
      'np',
      '_x',
      '__x',
      'x__',
      '_1a',
      'In2'
    ];
    const out = runPython(
      [`out = {n: H.reserved(n) for n in ${JSON.stringify(names)}}`].join('\n')
    );
    for (const n of names) {
      expect([n, out[n]]).toEqual([n, reservedName(n)]);
    }
  });
});
