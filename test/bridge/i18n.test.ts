/**
 * Every sentence the bridge makes goes through the translator it is given (domain 'perpend'),
 * and without one it speaks the same English as before. The kernel is a stand-in that answers
 * silent executes with replies built by the test (the real helper is exercised by
 * test/integration); a pseudo-locale marks every translated string with "‹fr›" so that a
 * sentence built outside the bundle shows up unmarked.
 */
import { Signal } from '@lumino/signaling';
import type { Kernel } from '@jupyterlab/services';
import type { ITranslator, TranslationBundle } from '@jupyterlab/translation';
import { KernelBridge } from '../../src/bridge/bridge';
import { CACHE_NOTES, cacheNotes } from '../../src/bridge/notes';
import { TRANSLATION_DOMAIN, bridgeBundle, strfmt } from '../../src/bridge/i18n';
import { checkIdentifier, normalizeIdentifier } from '../../src/bridge/names';

type Answer = (expr: string) => unknown;

class FakeKernel {
  status: Kernel.Status = 'idle';
  isDisposed = false;
  readonly statusChanged = new Signal<this, Kernel.Status>(this);
  readonly iopubMessage = new Signal<this, unknown>(this);
  readonly connectionStatusChanged = new Signal<this, Kernel.ConnectionStatus>(this);
  readonly disposed = new Signal<this, void>(this);
  readonly info: Promise<unknown>;
  constructor(
    private readonly _answer: Answer,
    language = 'python'
  ) {
    this.info = Promise.resolve({ language_info: { name: language } });
  }

  requestExecute(content: { user_expressions: Record<string, string> }) {
    const exprs: Record<string, unknown> = {};
    for (const [key, expr] of Object.entries(content.user_expressions)) {
      exprs[key] = {
        status: 'ok',
        data: { 'text/plain': JSON.stringify(this._answer(expr)) }
      };
    }
    return {
      done: Promise.resolve({ content: { status: 'ok', user_expressions: exprs } }),
      onIOPub: null
    };
  }
}

const loaded: string[] = [];
const marked = (s: string): string => `‹fr›${s}`;
// Every method of the English bundle, with its result marked.
const english = bridgeBundle() as unknown as Record<string, (...a: unknown[]) => string>;
const pseudo = Object.fromEntries(
  Object.keys(english).map(key => [key, (...a: unknown[]) => marked(english[key](...a))])
) as unknown as TranslationBundle;
const translator: ITranslator = {
  languageCode: 'fr',
  load: (domain: string) => {
    loaded.push(domain);
    return pseudo;
  }
};

function bridge(answer: Answer, options: { language?: string; translated?: boolean } = {}) {
  const kernel = new FakeKernel(answer, options.language);
  return new KernelBridge({
    kernel: kernel as unknown as Kernel.IKernelConnection,
    transport: 'base64',
    ...(options.translated === false ? {} : { translator })
  });
}

const listed = {
  vars: [{ name: 'x', shape: [3], dtype: 'int64', bytes: 24, readable: true, notes: ['list'] }]
};

describe('strfmt (the interpolation of the default English bundle)', () => {
  it("follows @jupyterlab/translation's Gettext.strfmt", () => {
    // The two examples in the documentation comment of Gettext.strfmt
    // (@jupyterlab/translation 4.6, lib/gettext.js).
    expect(strfmt('%1 dogs are in %2', 7, 'the kitchen')).toBe('7 dogs are in the kitchen');
    expect(strfmt('I like %1, bananas and %1', 'apples')).toBe('I like apples, bananas and apples');
    // "%%" stands for one "%", and is not a placeholder (the same function's rule).
    expect(strfmt('%1%% of %2', 50, 'x')).toBe('50% of x');
    expect(bridgeBundle().__('reading %1', 'x')).toBe('reading x');
  });
});

describe('the bridge speaks through its translator', () => {
  it("loads the domain 'perpend'", () => {
    loaded.length = 0;
    bridge(() => ({})).dispose();
    expect(loaded).toEqual([TRANSLATION_DOMAIN]);
    expect(TRANSLATION_DOMAIN).toBe('perpend');
  });

  it('translates listing notes, activity labels and a malformed reply', async () => {
    const labels: string[] = [];
    const b = bridge(() => listed);
    b.activityChanged.connect((_, a) => {
      if (a.label) {
        labels.push(a.label);
      }
    });
    const vars = await b.listVariables();
    expect(vars[0].notes).toEqual([
      '‹fr›A Python list: it is converted to a numpy array when read.'
    ]);
    expect(labels).toContain('‹fr›listing variables');
    b.dispose();
    const odd = bridge(() => ({ vars: 5 }));
    await expect(odd.listVariables()).rejects.toMatchObject({
      code: 'malformed',
      message:
        "‹fr›The kernel's reply while ‹fr›the variable list was not in the form Perpend expects, so it was ignored. Nothing in the panel was changed. (Was Perpend's helper in the kernel changed?)"
    });
    odd.dispose();
  });

  it('translates the question on a taken name, the warnings after a write, and a bad name', async () => {
    const data = { data: new Float64Array([1, 2]), shape: [2], complex: false, dtype: 'float64' };
    const taken = bridge(expr =>
      expr.includes('.w_begin(')
        ? { conflict: { exists: true, builtin: false, type: 'ndarray', module: null } }
        : { ok: true }
    );
    const asked = await taken.writeArray('w', data);
    expect(asked).toMatchObject({
      status: 'exists',
      message: '‹fr›"w" already exists in the kernel (it holds a ndarray). Overwrite it?'
    });
    taken.dispose();
    const shadowed = bridge(expr =>
      expr.includes('.w_end(')
        ? { written: true, was: { exists: true, builtin: true, type: null, module: 'numpy' } }
        : { ok: true }
    );
    const done = await shadowed.writeArray('ｗ', data, { overwrite: true });
    expect(done.status === 'written' && done.warnings).toEqual([
      '‹fr›Written as "w", the form Python itself uses for the name you typed (NFKC normalisation).',
      '‹fr›"w" was the module numpy; it is now the array.',
      '‹fr›"w" now shadows the Python builtin of that name.'
    ]);
    await expect(shadowed.writeArray('1x', data)).rejects.toMatchObject({
      code: 'invalid-name',
      message:
        '‹fr›Cannot write to "1x": ‹fr›"1x" is not a Python identifier (letters, digits and _ only, not starting with a digit).'
    });
    await expect(shadowed.readScalar('rec.__class__')).rejects.toThrow(
      '‹fr›path must not reach private attributes, got "__class__"'
    );
    shadowed.dispose();
  });

  it("translates the helper's refusals and a kernel that is not Python", async () => {
    const b = bridge(() => ({ error: 'too-large', detail: { bytes: 3 * 1048576, max: 1048576 } }));
    await expect(b.readArray({ kind: 'variable', name: 'big' })).rejects.toMatchObject({
      code: 'too-large',
      message:
        '‹fr›big is ‹fr›3.0 MiB as float64, over the limit of ‹fr›1.0 MiB (setting "maxArrayMiB"). A read costs several times that in browser memory; raise the setting or read a slice.'
    });
    b.dispose();
    const julia = bridge(() => ({}), { language: 'julia' });
    await expect(julia.listVariables()).rejects.toMatchObject({
      code: 'unsupported-kernel',
      message:
        "‹fr›This notebook's kernel runs julia, not Python: Perpend can only read arrays from the notebook's outputs."
    });
    julia.dispose();
  });

  it('speaks English without a translator, as before', async () => {
    const b = bridge(() => listed, { translated: false });
    const vars = await b.listVariables();
    expect(vars[0].notes).toEqual(['A Python list: it is converted to a numpy array when read.']);
    b.dispose();
    expect(cacheNotes(bridgeBundle())).toEqual(CACHE_NOTES);
    expect(cacheNotes(pseudo).reference).toBe(marked(CACHE_NOTES.reference));
    expect(normalizeIdentifier('class')).toEqual({
      ok: false,
      reason: '"class" is a Python keyword'
    });
    expect(normalizeIdentifier('class', pseudo)).toEqual({
      ok: false,
      reason: '‹fr›"class" is a Python keyword'
    });
    expect(() => checkIdentifier('name', '', pseudo)).toThrow(
      '‹fr›name is not a valid Python name: ‹fr›the name is empty'
    );
  });
});
