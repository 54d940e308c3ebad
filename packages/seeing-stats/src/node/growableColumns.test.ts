import { describe, expect, it } from 'vitest';
import { createRandom } from '../stats/random.js';
import { GrowableColumns } from './growableColumns.js';

describe('GrowableColumns', () => {
  it('gives back every row as pushed (line, status, anisotropy, exposure) across growth and a reserve', () => {
    const random = createRandom(7);
    const columns = new GrowableColumns();
    const pushed: { line: number; status: number; anisotropic: boolean; exposure: number; timeMs: number }[] = [];
    let line = 3;
    for (let index = 0; index < 5000; index += 1) {
      // Mostly consecutive lines, sometimes a gap (rejected rows, comments) of up to 40 lines.
      line += random() < 0.9 ? 1 : 1 + Math.floor(random() * 40);
      const row = { line, status: [0, 0, 0, 1, 2, 3, 4, 255][Math.floor(random() * 8)] ?? 0, anisotropic: random() < 0.3, exposure: Math.floor(random() * 3), timeMs: index * 60_000 };
      pushed.push(row);
      columns.push(row.timeMs, 0.5 + random(), row.line, row.status, row.anisotropic, row.exposure);
      if (index === 2000) columns.reserve(6000);
    }
    expect(columns.length).toBe(5000);
    pushed.forEach((row, index) => {
      expect(columns.lineAt(index)).toBe(row.line);
      expect(columns.statusAt(index)).toBe(row.status);
      expect(columns.anisotropicAt(index)).toBe(row.anisotropic ? 1 : 0);
      expect(columns.exposureAt(index)).toBe(row.exposure);
      expect(columns.timeMs[index]).toBe(row.timeMs);
    });
  });

  it('marks a row a duplicate without touching its other flags', () => {
    const columns = new GrowableColumns();
    columns.push(0, 0.7, 2, 3, true, 2);
    columns.setStatus(0, 255);
    expect([columns.statusAt(0), columns.anisotropicAt(0), columns.exposureAt(0)]).toEqual([255, 1, 2]);
  });
});
