import { describe, expect, it } from 'vitest';
import { parseArguments, UsageError } from './parseArguments.ts';

describe('analyzer arguments', () => {
  it('read the monitor, site, filters, mapping and output flags', () => {
    const parsed = parseArguments([
      'log.csv',
      '--aperture-mm', '60',
      '--baseline-mm=200',
      '--wavelength-nm', '650',
      '--response', 'g-tilt',
      '--map', 'seeing_arcsec=FWHM [arcsec]',
      '--map', 'time_utc=Timestamp (UTC)',
      '--site-lat', '-27.42',
      '--site-lon', '-70.15',
      '--sun-max-deg', '-12',
      '--max-zenith-deg', '50',
      '--min-flux', '1000',
      '--thresholds', '0.5,0.7',
      '--json',
    ]);
    expect(parsed.file).toBe('log.csv');
    expect(parsed.json).toBe(true);
    expect(parsed.options.monitor).toEqual({ apertureMm: 60, baselineMm: 200, wavelengthNm: 650, response: 'g-tilt' });
    expect(parsed.options.mapping).toEqual({ seeing_arcsec: 'FWHM [arcsec]', time_utc: 'Timestamp (UTC)' });
    expect(parsed.options.site).toEqual({ latitudeDeg: -27.42, longitudeDeg: -70.15 });
    expect(parsed.options.filters).toEqual({ sunMaxDeg: -12, maxZenithDeg: 50, minFlux: 1000 });
    expect(parsed.options.summary).toEqual({ thresholdsArcsec: [0.5, 0.7] });
    expect(parsed.telescope).toBeNull();
  });
  it('ask for a telescope prediction with any of its flags', () => {
    expect(parseArguments(['log.csv', '--outer-scale-m', '30']).telescope).toEqual({ wavelengthNm: 500, outerScaleM: 30 });
    expect(parseArguments(['log.csv', '--telescope-wavelength-nm', '2200', '--telescope-diameter-m', '8']).telescope).toEqual({ wavelengthNm: 2200, telescopeDiameterM: 8 });
  });
  it('default to 500 nm, Z-tilt and no site', () => {
    const parsed = parseArguments(['log.csv']);
    expect(parsed.options.monitor).toEqual({ wavelengthNm: 500, response: 'z-tilt' });
    expect(parsed.options.site).toBeUndefined();
    expect(parsed.options.mapping).toBeUndefined();
    expect(parsed.options.filters).toEqual({});
    expect(parsed.options.wavelengthGiven).toBe(false);
  });
  it('switch the anisotropy filter off with --keep-anisotropic and note a given wavelength', () => {
    const parsed = parseArguments(['log.csv', '--keep-anisotropic', '--wavelength-nm', '500']);
    expect(parsed.options.filters).toEqual({ leaveOutAnisotropic: false });
    expect(parsed.options.wavelengthGiven).toBe(true);
  });
  it('read --map field= as "the file has no such column", so that field is not matched by name', () => {
    expect(parseArguments(['log.csv', '--map', 'zenith_deg=ZD', '--map', 'flux=']).options.mapping).toEqual({ zenith_deg: 'ZD', flux: null });
  });
  it('refuse what they cannot use, saying what is wrong', () => {
    expect(() => parseArguments(['log.csv', '--pixel-scale'])).toThrow(new UsageError('Unknown flag --pixel-scale. Run with --help for the list of flags.'));
    expect(() => parseArguments(['log.csv', '--aperture-mm'])).toThrow(/--aperture-mm needs a number/);
    expect(() => parseArguments(['log.csv', '--response', 'centroid'])).toThrow(/z-tilt, g-tilt, sarazin-roddier/);
    expect(() => parseArguments(['log.csv', '--map', 'fwhm=FWHM'])).toThrow(/Calmcrest field name/);
    expect(() => parseArguments(['log.csv', '--map', 'flux'])).toThrow(/Calmcrest field name/);
    expect(() => parseArguments(['a.csv', 'b.csv'])).toThrow(/one log file/);
    expect(() => parseArguments(['log.csv', '--site-lon', '10'])).toThrow(/both --site-lat and --site-lon/);
    expect(() => parseArguments(['log.csv', '--thresholds', '0.6,x'])).toThrow(/--thresholds/);
    expect(() => parseArguments(['log.csv', '--replicates', '2.5'])).toThrow(/--replicates/);
  });

  it('read --time-format and --utc-offset into the reading options', () => {
    const parsed = parseArguments(['log.csv', '--time-format', 'mjd', '--utc-offset=-03:30']);
    expect(parsed.options.timeFormat).toBe('mjd');
    expect(parsed.options.utcOffsetMinutes).toBe(-210);
    expect(parseArguments(['log.csv']).options.timeFormat).toBeUndefined();
    expect(() => parseArguments(['log.csv', '--time-format', 'unix'])).toThrow(UsageError);
  });
});
