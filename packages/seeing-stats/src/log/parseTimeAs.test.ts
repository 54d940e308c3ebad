import { describe, expect, it } from 'vitest';
import { parseTimeAs, parseUtcOffsetMinutes } from './parseTimeAs.js';

describe('parseTimeAs', () => {
  it('reads Julian and modified Julian dates (J2000.0 = JD 2451545.0 = MJD 51544.5 = 2000-01-01T12:00Z, IAU definition)', () => {
    expect(parseTimeAs('2451545.0', 'jd')).toBe(Date.UTC(2000, 0, 1, 12));
    expect(parseTimeAs('51544.5', 'mjd')).toBe(Date.UTC(2000, 0, 1, 12));
    // Unix epoch: JD 2440587.5 (standard value).
    expect(parseTimeAs('2440587.5', 'jd')).toBe(0);
    expect(parseTimeAs('60735.96875', 'mjd')).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('2025-03-01', 'jd')).toBeNaN();
  });

  it('reads day-first and month-first dates, with and without seconds, and refuses impossible ones', () => {
    expect(parseTimeAs('01/03/2025 23:15:30', 'dmy')).toBe(Date.UTC(2025, 2, 1, 23, 15, 30));
    expect(parseTimeAs('03/01/2025 23:15', 'mdy')).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('1.3.2025 23:15', 'dmy')).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('31/02/2025 00:00', 'dmy')).toBeNaN();
    expect(parseTimeAs('13/13/2025 00:00', 'mdy')).toBeNaN();
  });

  it('takes zone-less times in the file offset, and keeps a time that names its own zone', () => {
    expect(parseTimeAs('2025-03-02 01:15:00', 'iso', 120)).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('02/03/2025 01:15', 'dmy', 120)).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('2025-03-01T23:15:00Z', 'iso', 120)).toBe(Date.UTC(2025, 2, 1, 23, 15));
    expect(parseTimeAs('2451545.0', 'jd', 120)).toBe(Date.UTC(2000, 0, 1, 12));
  });

  it('reads a file offset written the usual ways', () => {
    expect(parseUtcOffsetMinutes('+02:00')).toBe(120);
    expect(parseUtcOffsetMinutes('-0330')).toBe(-210);
    expect(parseUtcOffsetMinutes('UTC+2')).toBe(120);
    expect(() => parseUtcOffsetMinutes('two hours')).toThrow(/like \+02:00/);
  });
});
