import { describe, expect, it } from 'vitest';
import { createRandom } from '../stats/random.js';
import { createRowReader, type LogSample, type MonitorSettings } from './createRowReader.js';
import { blankSample, createFastRowReader, readIsoTime, readPlainDecimal, type RowReaderOptions } from './fastRowReader.js';
import { parseTimeAs } from './parseTimeAs.js';
import { parseUtcTime } from './parseUtcTime.js';
import { proposeMapping } from './proposeMapping.js';

// The fast reader must give what createRowReader gives, bit for bit: every check here compares the two (or
// Number() and parseUtcTime, which createRowReader uses) on the same text; no value is written down by hand.

const random = createRandom(20_261_205);
const pick = <T>(items: readonly T[]): T => items[Math.floor(random() * items.length)] as T;
const digits = (count: number): string => Array.from({ length: count }, () => String(Math.floor(random() * 10))).join('');

function randomDecimal(): string {
  const whole = digits(Math.floor(random() * 8));
  const fraction = digits(Math.floor(random() * 9)); // at most 7 + 8 = 15 digits
  const dot = fraction.length > 0 || random() < 0.2 ? '.' : '';
  return `${pick(['', '', '-', '+'])}${whole === '' && fraction === '' ? '7' : whole}${dot}${fraction}`;
}

function randomIsoTime(): string {
  const year = 1990 + Math.floor(random() * 40);
  const month = 1 + Math.floor(random() * 12);
  const day = 1 + Math.floor(random() * 31); // sometimes impossible (31 April): both must say NaN then
  const two = (value: number) => String(value).padStart(2, '0');
  const fraction = random() < 0.3 ? `.${digits(1 + Math.floor(random() * 6))}` : '';
  return `${year}-${two(month)}-${two(day)}${pick(['T', ' ', 't'])}${two(Math.floor(random() * 24))}:${two(Math.floor(random() * 60))}:${two(Math.floor(random() * 60))}${fraction}${pick(['Z', '', 'z'])}`;
}

describe('readPlainDecimal', () => {
  it('reads every plain decimal of up to 15 digits exactly as Number() does', () => {
    for (let attempt = 0; attempt < 20_000; attempt += 1) {
      const text = randomDecimal();
      const padded = `x,${text},y`;
      expect(Object.is(readPlainDecimal(padded, 2, 2 + text.length), Number(text))).toBe(true);
    }
    for (const text of ['0.785700', '-0', '-0.0', '.5', '5.', '+12.25', '999999999999999', '0.00000000000001']) {
      expect(Object.is(readPlainDecimal(text, 0, text.length), Number(text))).toBe(true);
    }
  });

  it('leaves every other notation to the full reader (NaN)', () => {
    for (const text of ['', '-', '.', '1e5', '1E-3', ' 1', '1 ', '0x1A', '0,85', '1.2.3', 'NaN', 'inf', '1234567890123456', '0.1234567890123456']) {
      expect(readPlainDecimal(text, 0, text.length)).toBeNaN();
    }
  });
});

describe('readIsoTime', () => {
  it('reads the fixed layouts to the same millisecond as parseUtcTime, impossible dates included', () => {
    for (let attempt = 0; attempt < 20_000; attempt += 1) {
      const text = randomIsoTime();
      const padded = `;${text};`;
      expect(Object.is(readIsoTime(padded, 1, 1 + text.length), parseUtcTime(text))).toBe(true);
    }
  });

  it('leaves offsets, times without seconds and blanks to parseUtcTime (NaN)', () => {
    for (const text of ['2025-03-01T23:15', '2025-03-01T23:15:07+02:00', ' 2025-03-01T23:15:07Z', '2025-03-01T23:15:07Z ', '2025-03-01T23:15:07.Z', '2025-03-01T23:15:07Zx']) {
      expect(readIsoTime(text, 0, text.length)).toBeNaN();
    }
  });
});

const monitor: MonitorSettings = { apertureMm: 60, baselineMm: 200, wavelengthNm: 650, response: 'z-tilt' };
const site = { latitudeDeg: -27.42, longitudeDeg: -70.15 };

/** Random rows for these headers: mostly plain, some damaged (blank, hex, exponent, NaN, out of range, bad time). */
function randomRow(headers: readonly string[]): string[] {
  return headers.map((header) => {
    const damage = random();
    if (damage < 0.03) return '';
    if (damage < 0.04) return pick(['0x1A', '1e-1', 'NaN', ' 0.5', '-1', '0', 'abc', '95', '0.5 ']);
    switch (header) {
      case 'time_utc':
        return damage < 0.06 ? pick(['2025-03-01T23:15', '2025-03-01T23:15:07+02:00', 'yesterday', '1980-01-01T00:00:00Z']) : randomIsoTime();
      case 'zenith_deg':
        return (random() * 70).toFixed(2);
      case 'airmass':
        return (1 + random() * 2).toFixed(4);
      case 'seeing_arcsec':
        return (0.2 + random() * 2).toFixed(3);
      case 'r0_cm':
        return (2 + random() * 30).toFixed(2);
      default:
        return (random() * (header === 'flux' ? 40_000 : 2)).toFixed(6);
    }
  });
}

function compareOn(headers: string[], options: Partial<RowReaderOptions>, rows: number): number {
  const readerOptions: RowReaderOptions = { headers, mapping: proposeMapping(headers), monitor, ...options };
  const slow = createRowReader(readerOptions);
  const fast = createFastRowReader(readerOptions);
  if (fast === null) throw new Error('no fast reader for these options');
  const delimiter = options.delimiter ?? ',';
  let plain = 0;
  for (let row = 0; row < rows; row += 1) {
    const fields = randomRow(headers);
    const line = fields.join(delimiter);
    const text = `junk\n${line}\nmore`;
    const expected = slow(fields, row + 1);
    const got: LogSample | null = fast(text, 5, 5 + line.length, blankSample());
    if (got === null) continue; // left to createRowReader: always allowed
    plain += 1;
    if (!expected.ok) throw new Error(`the fast reader accepted "${line}", createRowReader rejects it: ${expected.message}`);
    expect(got).toStrictEqual(expected.sample);
  }
  return plain;
}

describe('createFastRowReader', () => {
  it('gives the same sample as createRowReader for every row it reads, and reads most plain rows (variances, site, tau0)', () => {
    const plain = compareOn(['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'zenith_deg', 'flux', 'tau0_ms', 'rh_pct'], { site }, 4_000);
    expect(plain).toBeGreaterThan(2_500);
  });

  it('gives the same sample for seeing with airmass, r0 with zenith, semicolons and a UTC offset', () => {
    expect(compareOn(['time_utc', 'seeing_arcsec', 'airmass', 'wind_ms'], { delimiter: ';' }, 3_000)).toBeGreaterThan(2_000);
    expect(compareOn(['r0_cm', 'zenith_deg', 'time_utc', 'scint_index', 'theta0_arcsec'], { delimiter: '\t', utcOffsetMinutes: 150 }, 3_000)).toBeGreaterThan(2_000);
  });

  it('keeps the file zone only for times without their own Z, as parseTimeAs does', () => {
    const headers = ['time_utc', 'seeing_arcsec', 'zenith_deg'];
    const fast = createFastRowReader({ headers, mapping: proposeMapping(headers), monitor, utcOffsetMinutes: -300 });
    for (const time of ['2025-03-01T23:15:07', '2025-03-01T23:15:07Z']) {
      const line = `${time},0.8,10`;
      expect(fast?.(line, 0, line.length, blankSample())?.timeMs).toBe(parseTimeAs(time, 'iso', -300));
    }
  });

  it('leaves rows with a field count other than the header names to createRowReader', () => {
    const headers = ['time_utc', 'seeing_arcsec', 'zenith_deg'];
    const fast = createFastRowReader({ headers, mapping: proposeMapping(headers), monitor });
    for (const line of ['2025-03-01T23:15:07Z,0.8', '2025-03-01T23:15:07Z,0.8,10,', '2025-03-01T23:15:07Z,0.8,10,5']) {
      expect(fast?.(line, 0, line.length, blankSample())).toBeNull();
    }
  });

  it('has no fast reader for other time formats, centroid noise, interlaced exposures or white-space delimiters', () => {
    const headers = ['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'zenith_deg'];
    const base: RowReaderOptions = { headers, mapping: proposeMapping(headers), monitor };
    expect(createFastRowReader({ ...base, timeFormat: 'jd' })).toBeNull();
    expect(createFastRowReader({ ...base, delimiter: ' ' })).toBeNull();
    const noisy = [...headers, 'noise_long_arcsec2', 'noise_trans_arcsec2'];
    expect(createFastRowReader({ ...base, headers: noisy, mapping: proposeMapping(noisy) })).toBeNull();
    const interlaced = [...headers, 'var_long_2x_arcsec2', 'var_trans_2x_arcsec2'];
    expect(createFastRowReader({ ...base, headers: interlaced, mapping: proposeMapping(interlaced) })).toBeNull();
  });
});
