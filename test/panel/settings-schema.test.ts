/**
 * The settings schemas a user edits in JupyterLab's Settings Editor: every property says what it
 * is (title, description), has a default, and a number has bounds the default lies within
 * (JupyterLab's settings conventions); the plots' settings reach the plots under the names
 * they read.
 */
import * as fs from 'fs';
import * as path from 'path';
import { DEFAULT_PLOT_SETTINGS } from '../../src/panel/plots/settings';

const root = path.resolve(__dirname, '../..');
const schemas = fs
  .readdirSync(path.join(root, 'schema'))
  .filter(f => f.endsWith('.json'))
  .map(f => ({
    file: f,
    json: JSON.parse(fs.readFileSync(path.join(root, 'schema', f), 'utf8')) as {
      properties?: Record<string, Record<string, unknown>>;
    }
  }));

test.each(schemas.map(s => [s.file, s.json] as const))(
  '%s: every property has a title, a description, a default and bounds around it',
  (_file, json) => {
    for (const [name, p] of Object.entries(json.properties ?? {})) {
      expect(`${name}: ${typeof p.title}`).toBe(`${name}: string`);
      expect(`${name}: ${typeof p.description}`).toBe(`${name}: string`);
      expect(p).toHaveProperty('default');
      if (p.type === 'number' || p.type === 'integer') {
        const lo = (p.minimum ?? p.exclusiveMinimum) as number;
        expect(`${name}: ${typeof lo}`).toBe(`${name}: number`);
        expect(typeof p.maximum).toBe('number');
        if (p.minimum !== undefined) {
          expect(p.default as number).toBeGreaterThanOrEqual(lo);
        } else {
          expect(p.default as number).toBeGreaterThan(lo);
        }
        expect(p.default as number).toBeLessThanOrEqual(p.maximum as number);
      }
    }
  }
);

test('the plots’ settings default to what the plots assume without them', () => {
  const wb = schemas.find(s => s.file === 'workbench.json')!.json.properties!;
  expect(wb.plotPointsPerPixel.default).toBe(DEFAULT_PLOT_SETTINGS.pointsPerPixel);
  expect(wb.plotWelchSegment.default).toBe(DEFAULT_PLOT_SETTINGS.welchSegment);
  expect(wb.plotSpectrogramColumns.default).toBe(DEFAULT_PLOT_SETTINGS.spectrogramColumns);
  expect(wb.plotExportMaxRows.default).toBe(DEFAULT_PLOT_SETTINGS.csvMaxRows);
});
