/**
 * Sentences shown beside listed arrays: the notes on cell results from IPython's output cache,
 * and the notes the helper attaches to an array it lists (a list, a big-endian array, ...).
 */

/** Messages the panel can show next to cell results. */
export const CACHE_NOTES = {
  reference:
    "IPython's output cache holds a reference to this result: if the array is changed in place later, the result changes too.",
  notCached:
    "Results suppressed with ';' or shown with display() are not in IPython's output cache; pick the variable instead."
};

/** The sentence for each note code the helper attaches to a listed array. */
export const NOTE_TEXT: Record<string, string> = {
  list: 'A Python list: it is converted to a numpy array when read.',
  tuple: 'A Python tuple: it is converted to a numpy array when read.',
  subclass: 'A subclass of numpy.ndarray: its plain array data is read.',
  'big-endian': 'Stored big-endian: converted when read.',
  ndim: 'More than two dimensions: Perpend reads 1-D and 2-D arrays; select a slice into a variable first.',
  empty: 'Empty: there is nothing to read.',
  extended:
    'Extended precision (long double): it cannot be held exactly in float64, so Perpend does not read it.',
  int64:
    'int64/uint64: values beyond ±2^53 cannot be held exactly in float64; such arrays are refused when read.'
};
