import type { TranslationBundle } from '@jupyterlab/translation';

/**
 * The English bundle the models use when no translator is given (tests, other hosts): the
 * message ids as they are, with %1, %2, … replaced by the arguments and %% by %, as
 * JupyterLab's gettext does. The models' own module keeps @jupyterlab/translation to types so
 * that it loads under Node without a browser bundle.
 */
export function englishBundle(): TranslationBundle {
  const fmt = (text: string, args: unknown[]): string =>
    text
      .replace(/%%/g, '%% ')
      .replace(/%(\d+)/g, (m, i: string) =>
        Number(i) <= args.length ? String(args[Number(i) - 1]) : m
      )
      .replace(/%% /g, '%');
  const plural = (one: string, many: string, n: number): string => (n === 1 ? one : many);
  return {
    __: (msgid, ...args) => fmt(msgid, args),
    _n: (one, many, n, ...args) => fmt(plural(one, many, n), [n, ...args]),
    _p: (_ctx, msgid, ...args) => fmt(msgid, args),
    _np: (_ctx, one, many, n, ...args) => fmt(plural(one, many, n), [n, ...args]),
    gettext: (msgid, ...args) => fmt(msgid, args),
    ngettext: (one, many, n, ...args) => fmt(plural(one, many, n), [n, ...args]),
    pgettext: (_ctx, msgid, ...args) => fmt(msgid, args),
    npgettext: (_ctx, one, many, n, ...args) => fmt(plural(one, many, n), [n, ...args]),
    dcnpgettext: (_domain, _ctx, one, many, n, ...args) => fmt(plural(one, many, n), [n, ...args])
  };
}
