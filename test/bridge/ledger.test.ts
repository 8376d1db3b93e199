/** The session ledger: which (cell id, execution count) pairs this kernel session produced. */
import { SessionLedger } from '../../src/bridge/ledger';

describe('SessionLedger', () => {
  it('trusts only recorded pairs, the latest run of each cell', () => {
    const l = new SessionLedger();
    expect(l.record('c1', 3)).toBe(true);
    expect(l.trusts('c1', 3)).toBe(true);
    expect(l.trusts('c1', 4)).toBe(false);
    expect(l.trusts('c2', 3)).toBe(false);
    l.record('c1', 7);
    expect(l.trusts('c1', 3)).toBe(false);
    expect(l.trusts('c1', 7)).toBe(true);
    expect(l.trusts('c1', null)).toBe(false);
    expect(l.entries()).toEqual([{ cellId: 'c1', executionCount: 7 }]);
  });

  it('tells which cell holds a count', () => {
    const l = new SessionLedger();
    l.record('c1', 3);
    l.record('c2', 5);
    expect(l.cellFor(3)).toBe('c1');
    expect(l.cellFor(5)).toBe('c2');
    expect(l.cellFor(4)).toBeUndefined();
    l.record('c1', 6);
    expect(l.cellFor(3)).toBeUndefined();
    expect(l.cellFor(6)).toBe('c1');
  });

  it('forgets everything on reset and counts generations', () => {
    const l = new SessionLedger();
    l.record('c1', 1);
    const g = l.generation;
    l.reset();
    expect(l.generation).toBe(g + 1);
    expect(l.size).toBe(0);
    expect(l.trusts('c1', 1)).toBe(false);
  });

  it('ignores hostile or malformed notebook data', () => {
    const l = new SessionLedger();
    expect(l.record('', 1)).toBe(false);
    expect(l.record('c', 0)).toBe(false);
    expect(l.record('c', -1)).toBe(false);
    expect(l.record('c', 1.5)).toBe(false);
    expect(l.record('c', '3')).toBe(false);
    expect(l.record('c', 2 ** 60)).toBe(false);
    expect(l.record({ toString: () => 'c' }, 1)).toBe(false);
    expect(l.record('x'.repeat(300), 1)).toBe(false);
    expect(l.record('__proto__', 2)).toBe(true);
    expect(l.trusts('__proto__', 2)).toBe(true);
    expect(l.trusts('constructor', 2)).toBe(false);
    expect(l.size).toBe(1);
  });
});
