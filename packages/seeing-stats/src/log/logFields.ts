/** Field names of Calmcrest's native log format (README, "Log format"). */
export type LogField =
  | 'time_utc'
  | 'date_utc'
  | 'var_long_arcsec2'
  | 'var_trans_arcsec2'
  | 'var_long_px2'
  | 'var_trans_px2'
  | 'var_long_2x_arcsec2'
  | 'var_trans_2x_arcsec2'
  | 'var_long_2x_px2'
  | 'var_trans_2x_px2'
  | 'noise_long_arcsec2'
  | 'noise_trans_arcsec2'
  | 'noise_long_px2'
  | 'noise_trans_px2'
  | 'seeing_arcsec'
  | 'r0_cm'
  | 'zenith_deg'
  | 'airmass'
  | 'flux'
  | 'scint_index'
  | 'tau0_ms'
  | 'theta0_arcsec'
  | 'wind_ms'
  | 'rh_pct';

export const LOG_FIELDS: readonly LogField[] = [
  'time_utc',
  'date_utc',
  'var_long_arcsec2',
  'var_trans_arcsec2',
  'var_long_px2',
  'var_trans_px2',
  'var_long_2x_arcsec2',
  'var_trans_2x_arcsec2',
  'var_long_2x_px2',
  'var_trans_2x_px2',
  'noise_long_arcsec2',
  'noise_trans_arcsec2',
  'noise_long_px2',
  'noise_trans_px2',
  'seeing_arcsec',
  'r0_cm',
  'zenith_deg',
  'airmass',
  'flux',
  'scint_index',
  'tau0_ms',
  'theta0_arcsec',
  'wind_ms',
  'rh_pct',
];

export type FieldRequirement = 'always' | 'one-measure' | 'one-pointing' | 'optional';

/** What each field holds, for forms and messages. */
export const LOG_FIELD_INFO: Record<LogField, { label: string; unit: string; required: FieldRequirement }> = {
  time_utc: { label: 'Time of the sample (ISO 8601, UTC)', unit: 'UTC', required: 'always' },
  // Monitors that write the date and the time of day in two columns: the date is put in front of the time.
  date_utc: { label: 'Date of the sample, when the time of day is in its own column', unit: 'date', required: 'optional' },
  var_long_arcsec2: { label: 'Longitudinal differential image-motion variance', unit: 'arcsec²', required: 'one-measure' },
  var_trans_arcsec2: { label: 'Transverse differential image-motion variance', unit: 'arcsec²', required: 'one-measure' },
  var_long_px2: { label: 'Longitudinal differential image-motion variance', unit: 'pixel²', required: 'one-measure' },
  var_trans_px2: { label: 'Transverse differential image-motion variance', unit: 'pixel²', required: 'one-measure' },
  // Monitors that interlace two exposure times log the variances of the longer one too (exposure-time correction).
  var_long_2x_arcsec2: { label: 'Longitudinal variance at twice the exposure time', unit: 'arcsec²', required: 'optional' },
  var_trans_2x_arcsec2: { label: 'Transverse variance at twice the exposure time', unit: 'arcsec²', required: 'optional' },
  var_long_2x_px2: { label: 'Longitudinal variance at twice the exposure time', unit: 'pixel²', required: 'optional' },
  var_trans_2x_px2: { label: 'Transverse variance at twice the exposure time', unit: 'pixel²', required: 'optional' },
  // The monitor's measured centroid noise: the variance of one image's centroid on one axis (σc²), subtracted as 2σc².
  noise_long_arcsec2: { label: 'Centroid-noise variance of one image, longitudinal axis', unit: 'arcsec²', required: 'optional' },
  noise_trans_arcsec2: { label: 'Centroid-noise variance of one image, transverse axis', unit: 'arcsec²', required: 'optional' },
  noise_long_px2: { label: 'Centroid-noise variance of one image, longitudinal axis', unit: 'pixel²', required: 'optional' },
  noise_trans_px2: { label: 'Centroid-noise variance of one image, transverse axis', unit: 'pixel²', required: 'optional' },
  seeing_arcsec: { label: 'Seeing FWHM as the monitor computed it', unit: 'arcsec', required: 'one-measure' },
  r0_cm: { label: 'Fried parameter r0 as the monitor computed it', unit: 'cm', required: 'one-measure' },
  zenith_deg: { label: 'Zenith angle of the star', unit: 'deg', required: 'one-pointing' },
  airmass: { label: 'Airmass of the star (sec z)', unit: 'sec z', required: 'one-pointing' },
  flux: { label: 'Star flux', unit: 'counts', required: 'optional' },
  scint_index: { label: 'Scintillation index', unit: 'dimensionless', required: 'optional' },
  tau0_ms: { label: 'Coherence time τ0', unit: 'ms', required: 'optional' },
  theta0_arcsec: { label: 'Isoplanatic angle θ0', unit: 'arcsec', required: 'optional' },
  wind_ms: { label: 'Wind speed', unit: 'm/s', required: 'optional' },
  rh_pct: { label: 'Relative humidity', unit: '%', required: 'optional' },
};

/** Field → header text exactly as it appears in the file. */
export type ColumnMapping = Partial<Record<LogField, string>>;

/**
 * What a person says about some fields (analyzer --map, upload API): field → header, or null for "not in this
 * file". Fields left out are matched by name (proposeMapping).
 */
export type MappingOverrides = Partial<Record<LogField, string | null>>;

export function isLogField(name: string): name is LogField {
  return (LOG_FIELDS as readonly string[]).includes(name);
}
