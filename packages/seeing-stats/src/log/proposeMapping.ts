import { LOG_FIELDS, type ColumnMapping, type LogField, type MappingOverrides } from './logFields.js';

/** Header spellings seen in monitor exports, compared after lower-casing and dropping everything but letters and digits. */
const SYNONYMS: Record<LogField, readonly string[]> = {
  date_utc: ['date', 'day', 'obsdate', 'dateobs', 'utdate', 'dayutc', 'calendardate'],
  time_utc: ['time', 'timeutc', 'timestamp', 'timestamputc', 'datetime', 'datetimeutc', 'dateutc', 'utc', 'ut', 'isotime'],
  var_long_arcsec2: ['varlong', 'varl', 'longitudinalvariance', 'longitudinalvariancearcsec2', 'varlongitudinal'],
  var_trans_arcsec2: ['vartrans', 'vart', 'transversevariance', 'transversevariancearcsec2', 'vartransverse'],
  var_long_px2: ['varlongpx', 'varlongpix2', 'longitudinalvariancepx2', 'longitudinalvariancepixel2'],
  var_trans_px2: ['vartranspx', 'vartranspix2', 'transversevariancepx2', 'transversevariancepixel2'],
  var_long_2x_arcsec2: ['varlong2x', 'varl2x'],
  var_trans_2x_arcsec2: ['vartrans2x', 'vart2x'],
  var_long_2x_px2: ['varlong2xpx', 'varlong2xpix2'],
  var_trans_2x_px2: ['vartrans2xpx', 'vartrans2xpix2'],
  noise_long_arcsec2: ['noiselong', 'noisel', 'noisevarlong'],
  noise_trans_arcsec2: ['noisetrans', 'noiset', 'noisevartrans'],
  noise_long_px2: ['noiselongpx', 'noiselongpix2'],
  noise_trans_px2: ['noisetranspx', 'noisetranspix2'],
  seeing_arcsec: ['seeing', 'fwhm', 'fwhmarcsec', 'seeingarcsec', 'seeingfwhm', 'seeingfwhmarcsec', 'dimmseeing'],
  r0_cm: ['r0', 'r0cm', 'friedparameter', 'friedparametercm', 'fried'],
  zenith_deg: ['zenith', 'zenithangle', 'zenithangledeg', 'zenithdistance', 'zd', 'zdeg', 'zenithdeg'],
  airmass: ['airmass', 'am', 'secz'],
  flux: ['flux', 'counts', 'starflux', 'fluxadu'],
  scint_index: ['scint', 'scintindex', 'scintillation', 'scintillationindex'],
  tau0_ms: ['tau0', 'tau0ms', 'coherencetime', 'coherencetimems'],
  theta0_arcsec: ['theta0', 'theta0arcsec', 'isoplanaticangle', 'isoplanaticanglearcsec'],
  wind_ms: ['wind', 'windspeed', 'windms', 'windspeedms'],
  rh_pct: ['rh', 'rhpct', 'humidity', 'relativehumidity', 'humiditypct', 'rhpercent'],
};

function squashHeader(header: string): string {
  return header.toLowerCase().replace(/[^a-z0-9]/g, '');
}

/**
 * Proposes which header holds which field: native names matched case-insensitively first, then a few
 * obvious synonyms ("Timestamp (UTC)", "FWHM [arcsec]", "Airmass"). Each header is used once at most.
 * Example: proposeMapping(['Timestamp (UTC)', 'FWHM [arcsec]', 'Airmass']) → { time_utc: 'Timestamp (UTC)', seeing_arcsec: 'FWHM [arcsec]', airmass: 'Airmass' }.
 *
 * `overrides` (the analyzer's --map, the upload API's mapping) win for the fields they name and only for those:
 * a field given a header reads that header, a field given null is not read at all, and every other field is
 * still matched by name among the headers no override took. So `{}` overrides nothing, and
 * `{ zenith_deg: 'ZD' }` on a native log reads ZD as the zenith angle and every other column as before.
 */
export function proposeMapping(headers: readonly string[], overrides: MappingOverrides = {}): ColumnMapping {
  const mapping: ColumnMapping = {};
  const used = new Set<string>();
  const decided = new Set<LogField>();
  for (const field of LOG_FIELDS) {
    if (!Object.hasOwn(overrides, field)) continue;
    const header = overrides[field];
    if (header === undefined) continue;
    decided.add(field);
    if (header === null) continue;
    mapping[field] = header;
    used.add(header);
  }
  for (const field of LOG_FIELDS) {
    if (decided.has(field)) continue;
    const header = headers.find((candidate) => candidate.trim().toLowerCase() === field);
    if (header !== undefined && !used.has(header)) {
      mapping[field] = header;
      used.add(header);
    }
  }
  for (const field of LOG_FIELDS) {
    if (decided.has(field) || mapping[field] !== undefined) continue;
    const header = headers.find((candidate) => !used.has(candidate) && SYNONYMS[field].includes(squashHeader(candidate)));
    if (header !== undefined) {
      mapping[field] = header;
      used.add(header);
    }
  }
  // A lone "Date" column holds the whole time stamp: it is the time column, not half of a pair.
  if (mapping.date_utc !== undefined && mapping.time_utc === undefined && !decided.has('date_utc') && !decided.has('time_utc')) {
    mapping.time_utc = mapping.date_utc;
    delete mapping.date_utc;
  }
  return mapping;
}

/**
 * A complete mapping written as overrides that leave nothing to name matching: every field it does not map is
 * null. What the upload wizard sends, so the server reads exactly the mapping the person checked.
 */
export function exactMapping(mapping: ColumnMapping): MappingOverrides {
  const overrides: MappingOverrides = {};
  for (const field of LOG_FIELDS) overrides[field] = mapping[field] ?? null;
  return overrides;
}
