// Input rules that used to decide silently: mapping overrides, the pointing fallback, the zenith boundary and
// longitudes written two ways.
import { describe, expect, it } from 'vitest';
import { nightLabel, normalizeLongitudeDeg } from '../summary/nightLabel.js';
import { checkMapping } from './checkMapping.js';
import { createRowReader, type MonitorSettings, type RowResult } from './createRowReader.js';
import { DEFAULT_FILTERS, filterReason } from './filterReason.js';
import { previewLog } from './previewLog.js';
import { exactMapping, proposeMapping } from './proposeMapping.js';
import { createSunAltitude } from './sunAltitude.js';

const monitor: MonitorSettings = { wavelengthNm: 500, response: 'z-tilt' };

function sampleOf(result: RowResult): Extract<RowResult, { ok: true }>['sample'] {
  if (!result.ok) throw new Error(`expected a sample, got ${result.reason}: ${result.message}`);
  return result.sample;
}

describe('a mapping given by a person', () => {
  const headers = ['time_utc', 'seeing_arcsec', 'ZD', 'flux'];

  it('overrides only the fields it names; the others still match by name', () => {
    // The case of the issue: native headers except a zenith column called ZD, read with --map zenith_deg=ZD.
    const mapping = proposeMapping(headers, { zenith_deg: 'ZD' });
    expect(mapping).toEqual({ time_utc: 'time_utc', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'ZD', flux: 'flux' });
    expect(checkMapping(mapping, headers)).toEqual([]);
  });

  it('overrides nothing when it is empty', () => {
    expect(proposeMapping(headers, {})).toEqual(proposeMapping(headers));
    // ZD is a known spelling of the zenith angle, so the proposal finds it too
    expect(proposeMapping(headers, {}).zenith_deg).toBe('ZD');
  });

  it('takes a header away from the field that matched it by name, and reads nothing for a field set to null', () => {
    // flux holds the seeing in this file (a mislabelled export): the override wins and flux is not read as flux
    expect(proposeMapping(['time_utc', 'flux', 'zenith_deg'], { seeing_arcsec: 'flux' })).toEqual({ time_utc: 'time_utc', seeing_arcsec: 'flux', zenith_deg: 'zenith_deg' });
    expect(proposeMapping(headers, { flux: null })).toEqual({ time_utc: 'time_utc', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'ZD' });
  });

  it('is read exactly as checked when written with exactMapping (the upload wizard)', () => {
    const checked = { time_utc: 'time_utc', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'ZD' };
    expect(proposeMapping(headers, exactMapping(checked))).toEqual(checked);
  });

  it('reaches the preview and its rows the same way', () => {
    const preview = previewLog('time_utc,seeing_arcsec,ZD\n2025-03-01T02:00:00Z,0.8,30\n', { mapping: { zenith_deg: 'ZD' }, monitor });
    expect(preview.mappingProblems).toEqual([]);
    expect(preview.rows[0]?.sample?.zenithDeg).toBe(30);
  });
});

describe('the pointing of a row', () => {
  const headers = ['time_utc', 'seeing_arcsec', 'zenith_deg', 'airmass'];
  const reader = createRowReader({ headers, mapping: proposeMapping(headers), monitor });

  it('falls back to the airmass when the zenith angle is blank and both are mapped', () => {
    const sample = sampleOf(reader(['2025-03-01T02:00:00Z', '0.8', '', '2'], 2));
    // X = sec z: airmass 2 is 60° (seeing-physics.md §1.2, z = acos(1/X))
    expect(sample.zenithDeg).toBeCloseTo(60, 9);
    expect(sampleOf(reader(['2025-03-01T02:00:00Z', '0.8', ' ', '1'], 2)).zenithDeg).toBe(0);
  });

  it('prefers the zenith angle when both are there, and rejects a row with neither', () => {
    expect(sampleOf(reader(['2025-03-01T02:00:00Z', '0.8', '10', '2'], 2)).zenithDeg).toBe(10);
    const neither = reader(['2025-03-01T02:00:00Z', '0.8', '', ''], 2);
    expect(neither.ok ? null : neither.reason).toBe('missing_value');
  });

  it('does not hide a broken zenith angle behind the airmass', () => {
    const broken = reader(['2025-03-01T02:00:00Z', '0.8', 'NaN', '2'], 2);
    expect(broken.ok ? null : broken.reason).toBe('non_physical');
    const hex = reader(['2025-03-01T02:00:00Z', '0.8', '0x1A', '2'], 2);
    expect(hex.ok ? null : hex.reason).toBe('non_decimal_number');
  });
});

describe('the zenith limit', () => {
  it('lets airmass exactly 2 pass the 60° limit, and not a zenith angle visibly beyond it', () => {
    const airmassTwoDeg = Math.acos(1 / 2) * (180 / Math.PI);
    // the floating-point value is a hair above 60°: 60.000000000000014 in IEEE doubles
    expect(airmassTwoDeg).toBeGreaterThan(60);
    const night = { sunAltDeg: -30, flux: null };
    expect(filterReason({ ...night, zenithDeg: airmassTwoDeg }, DEFAULT_FILTERS)).toBeNull();
    expect(filterReason({ ...night, zenithDeg: 60.001 }, DEFAULT_FILTERS)).toBe('zenith_limit');
  });
});

describe('longitudes', () => {
  it('are brought to (−180°, 180°]', () => {
    expect(normalizeLongitudeDeg(190)).toBe(-170);
    expect(normalizeLongitudeDeg(360)).toBe(0);
    expect(normalizeLongitudeDeg(-180)).toBe(180);
    expect(normalizeLongitudeDeg(180)).toBe(180);
    expect(normalizeLongitudeDeg(-70.4)).toBe(-70.4);
    expect(() => normalizeLongitudeDeg(361)).toThrow(/\[-180, 360\]/);
  });

  it('name the same nights and give the same sun whether written 190° or −170°', () => {
    // 2025-03-02T06:30Z at 170° W is 19:10 local solar time on 1 March: the night of 1 March.
    const timeMs = Date.parse('2025-03-02T06:30:00Z');
    expect(nightLabel(timeMs, 190)).toBe('2025-03-01');
    expect(nightLabel(timeMs, -170)).toBe('2025-03-01');
    const east = createSunAltitude({ latitudeDeg: -20, longitudeDeg: 190 });
    const west = createSunAltitude({ latitudeDeg: -20, longitudeDeg: -170 });
    expect(east(timeMs)).toBe(west(timeMs));
  });
});
