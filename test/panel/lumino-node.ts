/**
 * @lumino/commands, when it loads, reads `navigator.platform` (to spell Accel as Ctrl or Cmd)
 * and makes one element to test selectors with (@lumino/domutils); Node 20 has neither. These
 * stand-ins let a test register and execute commands in Node; key bindings, which match
 * selectors against the DOM, are not exercised with them (the e2e tests press the keys).
 * Import this first.
 */
const g = globalThis as Record<string, unknown>;
g.navigator ??= { platform: 'Linux x86_64', userAgent: 'node' };
g.document ??= { createElement: () => ({}) };
g.Element ??= class {
  matches(): boolean {
    return false;
  }
};
export {};
