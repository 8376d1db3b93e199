/**
 * The bridge's sentences go through a JupyterLab translation bundle of the domain 'perpend'
 * (`trans.__('… %1', x)`), taken from the `translator` the plugin passes in.
 *
 * Without one, the bridge speaks English through {@link englishTranslator}, which does what
 * JupyterLab's `nullTranslator` does (returns the message with `%1`… replaced). It is not
 * imported from `@jupyterlab/translation` because that package ships ES modules only, which
 * the bridge's Node tests and benchmarks (CommonJS) cannot load; the types are imported, the
 * value is this file's.
 */
import type { ITranslator, TranslationBundle } from '@jupyterlab/translation';

/** The gettext domain of Perpend's messages. */
export const TRANSLATION_DOMAIN = 'perpend';

/**
 * `fmt` with `%1`, `%2`, … replaced by the arguments and `%%` left as one `%`: the rule of
 * `Gettext.strfmt` in @jupyterlab/translation 4.6 (lib/gettext.js), whose documented example
 * `strfmt("%1 dogs are in %2", 7, "the kitchen")` gives "7 dogs are in the kitchen".
 */
export function strfmt(fmt: string, ...args: unknown[]): string {
  return fmt
    .replace(/%%/g, '%% ')
    .replace(/%(\d+)/g, (_, p1: string) => String(args[Number(p1) - 1]))
    .replace(/%% /g, '%');
}

const singular = (msgid: string, ...args: unknown[]): string => strfmt(msgid, ...args);
const plural = (msgid: string, msgidPlural: string, n: number, ...args: unknown[]): string =>
  strfmt(n === 1 ? msgid : msgidPlural, n, ...args);

const english: TranslationBundle = {
  __: singular,
  gettext: singular,
  _p: (_context: string, msgid: string, ...args: unknown[]) => singular(msgid, ...args),
  pgettext: (_context: string, msgid: string, ...args: unknown[]) => singular(msgid, ...args),
  _n: plural,
  ngettext: plural,
  _np: (_context: string, msgid: string, msgidPlural: string, n: number, ...args: unknown[]) =>
    plural(msgid, msgidPlural, n, ...args),
  npgettext: (
    _context: string,
    msgid: string,
    msgidPlural: string,
    n: number,
    ...args: unknown[]
  ) => plural(msgid, msgidPlural, n, ...args),
  dcnpgettext: (
    _domain: string,
    _context: string,
    msgid: string,
    msgidPlural: string,
    n: number,
    ...args: unknown[]
  ) => plural(msgid, msgidPlural, n, ...args)
};

/** English, untranslated: the bridge's default translator. */
export const englishTranslator: ITranslator = {
  languageCode: 'en',
  load: () => english
};

/** The bundle of Perpend's domain from `translator` (English when none is given). */
export function bridgeBundle(translator?: ITranslator | null): TranslationBundle {
  return (translator ?? englishTranslator).load(TRANSLATION_DOMAIN);
}
