/** Small display formatters shared by the panel's views (pure functions, no DOM). */

/** "48000", "4 × 48000" (narrow no-break spaces around ×), "scalar" for []. */
export function formatShape(shape: ReadonlyArray<number>): string {
  return shape.length === 0 ? 'scalar' : shape.join('\u202f×\u202f');
}

/** Bytes in binary units, three significant digits: "768 B", "375 KiB", "1.50 MiB". */
export function formatBytes(bytes: number): string {
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit++;
  }
  if (unit === 0) {
    return `${bytes} B`;
  }
  return `${value >= 100 ? value.toFixed(0) : value >= 10 ? value.toFixed(1) : value.toFixed(2)} ${units[unit]}`;
}

/** A statistic for display: four significant digits, plain or exponent form as fits. */
export function formatValue(v: number): string {
  if (!Number.isFinite(v)) {
    return String(v);
  }
  if (v === 0) {
    return '0';
  }
  const a = Math.abs(v);
  return a >= 1e-3 && a < 1e5 ? String(Number(v.toPrecision(4))) : v.toExponential(3);
}
