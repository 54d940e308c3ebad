import { Body, Equator, Horizon, Observer } from 'astronomy-engine';
import { describe, expect, it } from 'vitest';
import { LogFormatError } from '../errors.js';
import { r0AtWavelength } from '../physics/toWavelength.js';
import { r0AtZenithAngle } from '../physics/toZenith.js';
import { responseCoefficients } from '../physics/responseCoefficients.js';
import { seeingFromR0 } from '../physics/seeingFromR0.js';
import { varianceFromR0 } from '../physics/varianceFromR0.js';
import { createRandom } from '../stats/random.js';
import { checkMapping } from './checkMapping.js';
import { createRowReader, type MonitorSettings, type RowResult } from './createRowReader.js';
import { detectDelimiter } from './detectDelimiter.js';
import { DEFAULT_FILTERS, filterReason } from './filterReason.js';
import { parseUtcTime } from './parseUtcTime.js';
import { previewLog } from './previewLog.js';
import { proposeMapping } from './proposeMapping.js';
import { createSunAltitude } from './sunAltitude.js';

const monitor: MonitorSettings = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' };
const varianceHeaders = ['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'zenith_deg', 'flux'];
const varianceReader = createRowReader({ headers: varianceHeaders, mapping: proposeMapping(varianceHeaders), monitor });

function sampleOf(result: RowResult): Extract<RowResult, { ok: true }>['sample'] {
  if (!result.ok) throw new Error(`expected a sample, got ${result.reason}: ${result.message}`);
  return result.sample;
}

describe('times', () => {
  it('reads ISO 8601 with T or space, with or without Z, fractions and offsets, as UTC', () => {
    const expected = Date.UTC(2025, 2, 1, 23, 15, 7);
    expect(parseUtcTime('2025-03-01T23:15:07Z')).toBe(expected);
    expect(parseUtcTime('2025-03-01 23:15:07')).toBe(expected);
    expect(parseUtcTime(' 2025-03-01T23:15:07 ')).toBe(expected);
    expect(parseUtcTime('2025-03-01T23:15:07.250Z')).toBe(expected + 250);
    expect(parseUtcTime('2025-03-02T01:15:07+02:00')).toBe(expected);
    expect(parseUtcTime('2025-03-01T23:15')).toBe(expected - 7000);
    expect(parseUtcTime('2024-02-29T00:00:00Z')).toBe(Date.parse('2024-02-29T00:00:00Z'));
  });
  it('refuses impossible dates and other text', () => {
    for (const text of ['2025-02-29T00:00:00Z', '2025-13-01T00:00:00Z', '2025-03-01T24:00:00Z', 'yesterday', '', '2025-03-01', '2025-03-01T23:15:07Q']) {
      expect(parseUtcTime(text)).toBeNaN();
    }
  });
  it('agrees with Date.parse on many generated times', () => {
    const random = createRandom(2);
    for (let index = 0; index < 2000; index += 1) {
      const time = Math.floor(random() * 4e12);
      const text = new Date(time).toISOString();
      expect(parseUtcTime(text)).toBe(Date.parse(text));
    }
  });
});

describe('delimiters and mapping', () => {
  it('detects comma, semicolon (even with decimal commas) and tab', () => {
    expect(detectDelimiter('# comment, with commas\ntime_utc,seeing_arcsec\n2025-01-01T00:00:00Z,0.8')).toBe(',');
    expect(detectDelimiter('Timestamp (UTC);FWHM [arcsec];Airmass\n2025-05-02 00:30:00;0,85;1,2')).toBe(';');
    expect(detectDelimiter('time_utc\tr0_cm\n2025-01-01T00:00:00Z\t12.0')).toBe('\t');
  });
  it('proposes native names case-insensitively and the wizard file’s headers by synonym', () => {
    expect(proposeMapping(['TIME_UTC', 'Seeing_Arcsec', 'zenith_deg'])).toEqual({ time_utc: 'TIME_UTC', seeing_arcsec: 'Seeing_Arcsec', zenith_deg: 'zenith_deg' });
    expect(proposeMapping(['Timestamp (UTC)', 'FWHM [arcsec]', 'Airmass', 'Wind [m/s]'])).toEqual({
      time_utc: 'Timestamp (UTC)',
      seeing_arcsec: 'FWHM [arcsec]',
      airmass: 'Airmass',
      wind_ms: 'Wind [m/s]',
    });
  });
  it('lists problems a person can act on', () => {
    expect(checkMapping({ time_utc: 'time', seeing_arcsec: 'fwhm', airmass: 'am' }, ['time', 'fwhm', 'am'])).toEqual([]);
    const problems = checkMapping({ var_long_arcsec2: 'a', zenith_deg: 'missing' }, ['a', 'b']);
    expect(problems.join(' ')).toMatch(/time_utc/);
    expect(problems.join(' ')).toMatch(/"missing"/);
    expect(problems.join(' ')).toMatch(/var_trans_arcsec2/);
    expect(checkMapping({ time_utc: 't', seeing_arcsec: 't', zenith_deg: 'z' }, ['t', 'z']).join(' ')).toMatch(/both time_utc and seeing_arcsec/);
  });
  it('refuses a reader for a mapping without time, and variances without geometry', () => {
    expect(() => createRowReader({ headers: ['seeing_arcsec', 'zenith_deg'], mapping: { seeing_arcsec: 'seeing_arcsec', zenith_deg: 'zenith_deg' }, monitor })).toThrow(LogFormatError);
    const withoutGeometry = (): unknown => createRowReader({ headers: varianceHeaders, mapping: proposeMapping(varianceHeaders), monitor: { wavelengthNm: 500, response: 'z-tilt' } });
    expect(withoutGeometry).toThrow(/monitor geometry is not known/);
    try {
      withoutGeometry();
    } catch (error) {
      expect(error instanceof LogFormatError ? error.hint : '').toMatch(/--aperture-mm D --baseline-mm B/);
    }
  });
});

describe('row reader', () => {
  it('recovers known r0 values at random zenith angles and wavelengths to 1e-9 (round trip through variances)', () => {
    const random = createRandom(12);
    for (let index = 0; index < 500; index += 1) {
      const wavelengthNm = 400 + 500 * random();
      const zenithDeg = 70 * random();
      const apertureMm = 40 + 60 * random();
      const baselineMm = apertureMm * (2.2 + 3 * random());
      const response = (['z-tilt', 'g-tilt', 'sarazin-roddier'] as const)[index % 3] ?? 'z-tilt';
      const r0ReferenceCm = 4 + 20 * random(); // at zenith, 500 nm
      // forward: the r0 the monitor saw at its wavelength and zenith angle, then the variances it would log
      const r0ThereCm = r0AtZenithAngle(r0AtWavelength(r0ReferenceCm, 500, wavelengthNm), zenithDeg);
      const coefficients = responseCoefficients(baselineMm / apertureMm, response);
      const varianceLong = varianceFromR0(r0ThereCm, coefficients.longitudinal, wavelengthNm, apertureMm);
      const varianceTrans = varianceFromR0(r0ThereCm, coefficients.transverse, wavelengthNm, apertureMm);
      const reader = createRowReader({ headers: varianceHeaders, mapping: proposeMapping(varianceHeaders), monitor: { apertureMm, baselineMm, wavelengthNm, response } });
      const sample = sampleOf(reader(['2025-03-01T00:00:00Z', String(varianceLong), String(varianceTrans), String(zenithDeg), ''], 2));
      expect(Math.abs(sample.r0Cm / r0ReferenceCm - 1)).toBeLessThan(1e-9);
      expect(Math.abs(sample.seeingArcsec / seeingFromR0(r0ReferenceCm, 500) - 1)).toBeLessThan(1e-9);
      expect(sample.anisotropic).toBe(false);
    }
  });
  it('averages the two axis estimates and flags a sample whose axes disagree', () => {
    const { longitudinal, transverse } = responseCoefficients(200 / 60, 'z-tilt');
    const sample = sampleOf(varianceReader(['2025-03-01T00:00:00Z', String(varianceFromR0(10, longitudinal, 500, 60)), String(varianceFromR0(6, transverse, 500, 60)), '0', '1000'], 2));
    expect(sample.seeingLongArcsec).toBeCloseTo(seeingFromR0(10, 500), 9);
    expect(sample.seeingTransArcsec).toBeCloseTo(seeingFromR0(6, 500), 9);
    expect(sample.seeingArcsec).toBeCloseTo((seeingFromR0(10, 500) + seeingFromR0(6, 500)) / 2, 9);
    expect(sample.anisotropic).toBe(true);
    expect(sample.flux).toBe(1000);
  });
  it('reads pixel² variances with the plate scale', () => {
    const headers = ['time_utc', 'var_long_px2', 'var_trans_px2', 'zenith_deg'];
    const pixelReader = createRowReader({ headers, mapping: proposeMapping(headers), monitor: { ...monitor, pixelScaleArcsec: 0.5 } });
    const fromPixels = sampleOf(pixelReader(['2025-03-01T00:00:00Z', '0.4', '0.3', '20'], 2));
    const fromArcsec = sampleOf(varianceReader(['2025-03-01T00:00:00Z', String(0.4 * 0.25), String(0.3 * 0.25), '20', ''], 2));
    expect(fromPixels.seeingArcsec).toBeCloseTo(fromArcsec.seeingArcsec, 12);
  });
  it('reduces seeing with airmass to zenith and 500 nm', () => {
    const headers = ['Timestamp (UTC)', 'FWHM [arcsec]', 'Airmass'];
    const reader = createRowReader({ headers, mapping: proposeMapping(headers), monitor: { wavelengthNm: 500, response: 'z-tilt' }, delimiter: ';' });
    // 0.90″ at airmass √2 (45°) is 0.7310″ at zenith: seeing-physics.md §9 #5
    expect(sampleOf(reader(['2025-05-02 00:30:00', '0.9', String(Math.SQRT2)], 2)).seeingArcsec).toBeCloseTo(0.731, 4);
    expect(sampleOf(reader(['2025-05-02 00:30:00', '0,9', String(Math.SQRT2)], 2)).seeingArcsec).toBeCloseTo(0.731, 4);
  });
  it('turns r0 measured at 2200 nm into seeing at 500 nm', () => {
    const headers = ['time_utc', 'r0_cm', 'zenith_deg'];
    const reader = createRowReader({ headers, mapping: proposeMapping(headers), monitor: { wavelengthNm: 2200, response: 'z-tilt' } });
    // r0 = 59.18 cm at 2.2 µm is 10 cm at 500 nm: seeing-physics.md §9 #3
    expect(sampleOf(reader(['2025-05-02T00:30:00Z', '59.18', '0'], 2)).r0Cm).toBeCloseTo(10, 2);
  });
  it('names the reason of every bad row', () => {
    const cases: [string[], string][] = [
      [['not a time', '0.1', '0.1', '10', ''], 'unreadable_time'],
      [['', '0.1', '0.1', '10', ''], 'unreadable_time'],
      [['2025-03-01T00:00:00Z', '', '0.1', '10', ''], 'missing_value'],
      [['2025-03-01T00:00:00Z', 'abc', '0.1', '10', ''], 'missing_value'],
      [['2025-03-01T00:00:00Z', '0.1'], 'missing_value'],
      [['2025-03-01T00:00:00Z', '0', '0.1', '10', ''], 'non_physical'],
      [['2025-03-01T00:00:00Z', '0.1', '-0.1', '10', ''], 'non_physical'],
      [['2025-03-01T00:00:00Z', 'NaN', '0.1', '10', ''], 'non_physical'],
      [['2025-03-01T00:00:00Z', '0.1', 'inf', '10', ''], 'non_physical'],
      [['2025-03-01T00:00:00Z', '0.1', '0.1', '90', ''], 'non_physical'],
      [['2025-03-01T00:00:00Z', '0.1', '0.1', '-1', ''], 'non_physical'],
    ];
    for (const [fields, reason] of cases) {
      const result = varianceReader(fields, 7);
      expect(result.ok ? 'ok' : result.reason, fields.join(',')).toBe(reason);
    }
    const airmassHeaders = ['time_utc', 'seeing_arcsec', 'airmass'];
    const airmassReader = createRowReader({ headers: airmassHeaders, mapping: proposeMapping(airmassHeaders), monitor });
    const belowOne = airmassReader(['2025-03-01T00:00:00Z', '0.8', '0.99'], 3);
    expect(belowOne.ok ? 'ok' : belowOne.reason).toBe('non_physical');
  });
});

describe('filters', () => {
  it('drop samples above the zenith limit, with the sun up, or faint, and pass the boundaries', () => {
    expect(filterReason({ zenithDeg: 60, sunAltDeg: -18, flux: 100 }, { ...DEFAULT_FILTERS, minFlux: 100 })).toBeNull();
    expect(filterReason({ zenithDeg: 60.01, sunAltDeg: -30, flux: null }, DEFAULT_FILTERS)).toBe('zenith_limit');
    expect(filterReason({ zenithDeg: 20, sunAltDeg: -17.9, flux: null }, DEFAULT_FILTERS)).toBe('sun_above_limit');
    expect(filterReason({ zenithDeg: 20, sunAltDeg: null, flux: null }, DEFAULT_FILTERS)).toBeNull();
    expect(filterReason({ zenithDeg: 20, sunAltDeg: -30, flux: 99 }, { ...DEFAULT_FILTERS, minFlux: 100 })).toBe('low_flux');
  });
  it('computes the sun altitude within 0.01° of astronomy-engine’s full calculation', () => {
    const site = { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 };
    const fast = createSunAltitude(site);
    const observer = new Observer(site.latitudeDeg, site.longitudeDeg, site.elevationM);
    const random = createRandom(13);
    let worst = 0;
    for (let index = 0; index < 400; index += 1) {
      const date = new Date(Date.UTC(2020, 0, 1) + random() * 10 * 365.25 * 86_400_000);
      const position = Equator(Body.Sun, date, observer, true, true);
      const exact = Horizon(date, observer, position.ra, position.dec).altitude; // no refraction
      worst = Math.max(worst, Math.abs(fast(date.getTime()) - exact));
    }
    expect(worst).toBeLessThan(0.01);
  });
});

describe('preview', () => {
  it('proposes the mapping and reads the first rows of a semicolon export', () => {
    const text = 'Timestamp (UTC);FWHM [arcsec];Airmass\n2025-05-02 00:30:00;0.85;1.2\n2025-05-02 00:32:00;;1.2\n';
    const preview = previewLog(text, { monitor: { wavelengthNm: 500, response: 'z-tilt' } });
    expect(preview.delimiter).toBe(';');
    expect(preview.mappingProblems).toEqual([]);
    expect(preview.rows).toHaveLength(2);
    expect(preview.rows[0]?.sample?.seeingArcsec).toBeGreaterThan(0.7);
    expect(preview.rows[1]?.problem).toMatch(/seeing_arcsec is empty/);
    expect(preview.rows[1]?.line).toBe(3);
  });
  it('shows mapping problems instead of samples when the columns are not understood', () => {
    const preview = previewLog('a,b\n1,2\n', { monitor });
    expect(preview.mappingProblems.length).toBeGreaterThan(0);
    expect(preview.rows[0]?.sample).toBeNull();
  });
});
