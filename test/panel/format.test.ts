// Display formatters of the panel (common practice: binary prefixes as in IEC 80000-13).
import { formatBytes, formatShape } from '../../src/panel/format';

test('shapes read like numpy shapes with a multiplication sign', () => {
  expect(formatShape([])).toBe('scalar');
  expect(formatShape([48000])).toBe('48000');
  expect(formatShape([4, 48000])).toBe('4\u202f×\u202f48000');
});

test('sizes use binary prefixes with three significant digits', () => {
  expect(formatBytes(0)).toBe('0 B');
  expect(formatBytes(1023)).toBe('1023 B');
  expect(formatBytes(1024)).toBe('1.00 KiB');
  expect(formatBytes(256000)).toBe('250 KiB');
  expect(formatBytes(1.5 * 1024 * 1024)).toBe('1.50 MiB');
  expect(formatBytes(12.25 * 1024 ** 3)).toBe('12.3 GiB');
});
