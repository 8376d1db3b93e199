/**
 * Names and literals that reach kernel code, checked against Python itself (the project's
 * venv): `unicodedata.normalize('NFKC', s).isidentifier()` and `keyword.iskeyword` decide
 * what a name is ("Python Language Reference" §2.3, PEP 3131), `ast.literal_eval` decides
 * what a literal means (§2.4.1).
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import {
  checkIdentifier,
  normalizeIdentifier,
  pyIntLiteral,
  pyStringLiteral,
  reservedName
} from '../../src/bridge/names';

const PYTHON = path.resolve(__dirname, '../../.venv/bin/python');

function python(script: string, input: unknown): unknown {
  const r = spawnSync(PYTHON, ['-c', script], { input: JSON.stringify(input), encoding: 'utf8' });
  if (r.status !== 0) {
    throw new Error(r.stderr);
  }
  return JSON.parse(r.stdout);
}

const HOSTILE = [
  'x',
  '_',
  'x1',
  '1x',
  'x; import os',
  "__import__('os')",
  'a"b',
  "a'b",
  'a\nb',
  'x\n',
  ' x',
  '',
  'ｘ', // full-width x
  'ﬁle', // "fi" ligature
  '𝑥', // mathematical italic x
  'x²', // superscript two → x2
  '²',
  'e\u0301', // e + combining acute → é
  'é',
  'λ',
  'データ',
  'x\u200d',
  '\u200dx',
  'class',
  'None',
  'True',
  'match',
  'case',
  'type',
  'async',
  'a-b',
  'a.b',
  '$x',
  'x\u0000',
  'exec',
  'print',
  'Ⅸ', // Roman numeral nine (NFKC → IX)
  '℮',
  '\u2118', // script P (Other_ID_Start)
  'a\u00b7b', // middle dot (Other_ID_Continue)
  'x'.repeat(201)
];

// A deterministic sample of code points from long-assigned blocks.
for (let cp = 0x20; cp < 0x2200; cp += 7) {
  HOSTILE.push('a' + String.fromCodePoint(cp));
  HOSTILE.push(String.fromCodePoint(cp) + 'a');
}

describe('normalizeIdentifier', () => {
  it('agrees with Python on every sample (valid, NFKC form, keyword)', () => {
    const want = python(
      [
        'import json, sys, unicodedata, keyword',
        'out = []',
        'for s in json.load(sys.stdin):',
        '    n = unicodedata.normalize("NFKC", s)',
        '    known = all(unicodedata.category(c) != "Cn" for c in s)',
        '    out.append([n.isidentifier() and not keyword.iskeyword(n) and 0 < len(n) <= 200, n, known])',
        'print(json.dumps(out))'
      ].join('\n'),
      HOSTILE
    ) as Array<[boolean, string, boolean]>;
    const disagreements: string[] = [];
    HOSTILE.forEach((s, i) => {
      if (!want[i][2]) {
        // Unassigned in this Python's Unicode database (newer than Python 3.11's Unicode 14):
        // the kernel's own check decides (the helper validates every name again).
        return;
      }
      const r = normalizeIdentifier(s);
      if (r.ok !== want[i][0] || (r.ok && r.name !== want[i][1])) {
        disagreements.push(
          `${JSON.stringify(s)}: ours ${JSON.stringify(r)}, Python ${JSON.stringify(want[i])}`
        );
      }
    });
    expect(disagreements).toEqual([]);
  });

  it('maps look-alikes to the name Python uses, and says so', () => {
    expect(normalizeIdentifier('ｘ')).toEqual({ ok: true, name: 'x', changed: true });
    expect(normalizeIdentifier('x')).toEqual({ ok: true, name: 'x', changed: false });
    expect(normalizeIdentifier('ﬁle')).toEqual({ ok: true, name: 'file', changed: true });
  });

  it('explains refusals and throws TypeError naming the argument', () => {
    expect(normalizeIdentifier('class')).toEqual({
      ok: false,
      reason: '"class" is a Python keyword'
    });
    expect(normalizeIdentifier(5)).toEqual({
      ok: false,
      reason: 'a name must be a string, got number'
    });
    expect(() => checkIdentifier('name', 'x; import os')).toThrow(
      new TypeError(
        'name is not a valid Python name: "x; import os" is not a Python identifier (letters, digits and _ only, not starting with a digit)'
      )
    );
  });
});

describe('pyStringLiteral', () => {
  const strings = [
    '',
    'plain',
    '"',
    "'",
    '"""',
    "'''",
    '\\',
    '\\"',
    'a\nb\r\nc\t',
    '\u0000\u0007\u001b',
    'x"; import os; "',
    "') ; __import__('os').system('x') ; ('",
    '\\N{BULLET}',
    '{0}{1}%s',
    'é ü ß データ',
    '😀 𝑥',
    '\ud800', // a lone surrogate
    '\u2028\u2029\u0085',
    '\x7f\x80\xff'
  ];

  it('is read back by Python as exactly the same string, in ASCII', () => {
    const lits = strings.map(pyStringLiteral);
    for (const l of lits) {
      expect(/^[\x20-\x7e]*$/.test(l)).toBe(true);
    }
    // Compare code point lists (JSON would mangle a lone surrogate).
    const back = python(
      'import ast, json, sys\nprint(json.dumps([[ord(c) for c in ast.literal_eval(l)] for l in json.load(sys.stdin)]))',
      lits
    ) as number[][];
    strings.forEach((s, i) => {
      expect(back[i]).toEqual(Array.from(s, c => c.codePointAt(0)));
    });
  });

  it('int literals accept safe integers only', () => {
    expect(pyIntLiteral('n', 42)).toBe('42');
    expect(() => pyIntLiteral('n', 1.5)).toThrow(
      new TypeError('n must be a safe integer, got 1.5')
    );
    expect(() => pyIntLiteral('n', '1; import os')).toThrow(TypeError);
    expect(() => pyIntLiteral('n', 2 ** 60)).toThrow(TypeError);
  });
});

describe('reservedName', () => {
  it("refuses Python's __*__ names (Python Language Reference §2.3.2) and IPython's own", () => {
    for (const n of ['__builtins__', '__import__', '__name__', '__spec__', '__loader__', '__x__']) {
      expect(reservedName(n)).toBe('dunder');
    }
    for (const n of ['In', 'Out', 'get_ipython', 'exit', 'quit', '_', '__', '___', '_i', '_ii']) {
      expect(reservedName(n)).toBe('ipython');
    }
    for (const n of ['_1', '_42', '_i1', '_i42', '_ih', '_oh', '_dh']) {
      expect(reservedName(n)).toBe('ipython');
    }
  });

  it('leaves their neighbours alone: builtins, private and near-dunder names', () => {
    for (const n of [
      'sum',
      'print',
      'np',
      'x',
      '_x',
      '__x',
      'x__',
      '____',
      '_i1a',
      '_1a',
      'in_',
      'out',
      'In2',
      '__init'
    ]) {
      expect(reservedName(n)).toBeNull();
    }
  });
});
