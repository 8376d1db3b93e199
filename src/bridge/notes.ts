/**
 * Sentences shown beside listed arrays: the notes on cell results from IPython's output cache,
 * and the notes the helper attaches to an array it lists (a list, a big-endian array, ...).
 */
import type { TranslationBundle } from '@jupyterlab/translation';
import { bridgeBundle } from './i18n';

/** Messages the panel can show next to cell results. */
export interface CacheNotes {
  /** Beside every listed cell result. */
  reference: string;
  /** When a cell the user picks is not listed. */
  notCached: string;
}

/** {@link CacheNotes} in the language of `trans` (the bundle of the domain 'perpend'). */
export function cacheNotes(trans: TranslationBundle): CacheNotes {
  return {
    reference: trans.__(
      "IPython's output cache holds a reference to this result: if the array is changed in place later, the result changes too."
    ),
    notCached: trans.__(
      "Results suppressed with ';' or shown with display() are not in IPython's output cache; pick the variable instead."
    )
  };
}

/** {@link CacheNotes} in English; with a translator, use {@link cacheNotes}. */
export const CACHE_NOTES: CacheNotes = cacheNotes(bridgeBundle());

/** The sentence for each note code the helper attaches to a listed array. */
export function noteTexts(trans: TranslationBundle): Record<string, string> {
  return {
    list: trans.__('A Python list: it is converted to a numpy array when read.'),
    tuple: trans.__('A Python tuple: it is converted to a numpy array when read.'),
    subclass: trans.__('A subclass of numpy.ndarray: its plain array data is read.'),
    'big-endian': trans.__('Stored big-endian: converted when read.'),
    ndim: trans.__(
      'More than two dimensions: Perpend reads 1-D and 2-D arrays; select a slice into a variable first.'
    ),
    empty: trans.__('Empty: there is nothing to read.'),
    extended: trans.__(
      'Extended precision (long double): it cannot be held exactly in float64, so Perpend does not read it.'
    ),
    int64: trans.__(
      'int64/uint64: values beyond ±2^53 cannot be held exactly in float64; such arrays are refused when read.'
    )
  };
}
