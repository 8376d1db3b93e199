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

/** The note on a numpy masked array with `count` masked entries (-1: not countable). */
export function maskedNote(trans: TranslationBundle, count: number, size: number): string {
  if (count === 0) {
    return trans.__('A numpy masked array with no entry masked: its data are read.');
  }
  return count > 0
    ? trans.__(
        'A numpy masked array: %1 of its %2 entries are masked, so it is not read (masked entries hold no values). Fill or drop them into a plain variable first.',
        count,
        size
      )
    : trans.__(
        'A numpy masked array whose mask Perpend cannot count, so it is not read. Fill or drop the masked entries into a plain variable first.'
      );
}

/**
 * The note on an array listed under a key Perpend cannot name (it is listed, unreadable,
 * rather than dropped): `why` is the helper's reason.
 */
export function unnamedNote(
  trans: TranslationBundle,
  why: string,
  length: number,
  maxLength: number
): string {
  switch (why) {
    case 'long':
      return trans.__(
        'Its name has %1 characters, more than the %2 Perpend accepts, so it cannot be read. Bind it to a shorter name first.',
        length,
        maxLength
      );
    case 'nfkc':
      return trans.__(
        'Its key in the namespace is not in the form Python gives names (NFKC), so no code can name it and Perpend cannot read it. Bind it to a plain name first.'
      );
    case 'key':
      return trans.__(
        'Its key in the namespace is not a string, so Perpend cannot name it or read it. Bind it to a plain name first.'
      );
    default:
      return trans.__(
        'Its key in the namespace is not a Python name (it was set through globals()), so Perpend cannot read it. Bind it to a Python name first.'
      );
  }
}
