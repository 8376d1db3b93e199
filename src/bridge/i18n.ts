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

const english: TranslationBundle = {
  __: (msgid: string, ...args: unknown[]) => strfmt(msgid, ...args),
  _n: (msgid: string, plural: string, n: number, ...args: unknown[]) =>
    strfmt(n === 1 ? msgid : plural, n, ...args),
  _p: (_ctx: string, msgid: string, ...args: unknown[]) => strfmt(msgid, ...args),
  _np: (_ctx: string, msgid: string, plural: string, n: number, ...args: unknown[]) =>
    strfmt(n === 1 ? msgid : plural, n, ...args),
  gettext: (msgid: string, ...args: unknown[]) => strfmt(msgid, ...args),
  ngettext: (msgid: string, plural: string, n: number, ...args: unknown[]) =>
    strfmt(n === 1 ? msgid : plural, n, ...args),
  pgettext: (_ctx: string, msgid: string, ...args: unknown[]) => strfmt(msgid, ...args),
  npgettext: (_ctx: string, msgid: string, plural: string, n: number, ...args: unknown[]) =>
    strfmt(n === 1 ? msgid : plural, n, ...args),
  dcnpgettext: (
    _domain: string,
    _ctx: string,
    msgid: string,
    plural: string,
    n: number,
    ...args: unknown[]
  ) => strfmt(n === 1 ? msgid : plural, n, ...args)
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
