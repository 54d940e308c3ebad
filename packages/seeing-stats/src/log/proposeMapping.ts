import { LOG_FIELDS, type ColumnMapping, type LogField } from './logFields.js';

/** Header spellings seen in monitor exports, compared after lower-casing and dropping everything but letters and digits. */
const SYNONYMS: Record<LogField, readonly string[]> = {
  time_utc: ['time', 'timeutc', 'timestamp', 'timestamputc', 'datetime', 'datetimeutc', 'dateutc', 'utc', 'ut', 'isotime'],
  var_long_arcsec2: ['varlong', 'varl', 'longitudinalvariance', 'longitudinalvariancearcsec2', 'varlongitudinal'],
  var_trans_arcsec2: ['vartrans', 'vart', 'transversevariance', 'transversevariancearcsec2', 'vartransverse'],
  var_long_px2: ['varlongpx', 'varlongpix2', 'longitudinalvariancepx2', 'longitudinalvariancepixel2'],
  var_trans_px2: ['vartranspx', 'vartranspix2', 'transversevariancepx2', 'transversevariancepixel2'],
  var_long_2x_arcsec2: ['varlong2x', 'varl2x'],
  var_trans_2x_arcsec2: ['vartrans2x', 'vart2x'],
  var_long_2x_px2: ['varlong2xpx', 'varlong2xpix2'],
  var_trans_2x_px2: ['vartrans2xpx', 'vartrans2xpix2'],
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
 */
export function proposeMapping(headers: readonly string[]): ColumnMapping {
  const mapping: ColumnMapping = {};
  const used = new Set<string>();
  for (const field of LOG_FIELDS) {
    const header = headers.find((candidate) => candidate.trim().toLowerCase() === field);
    if (header !== undefined && !used.has(header)) {
      mapping[field] = header;
      used.add(header);
    }
  }
  for (const field of LOG_FIELDS) {
    if (mapping[field] !== undefined) continue;
    const header = headers.find((candidate) => !used.has(candidate) && SYNONYMS[field].includes(squashHeader(candidate)));
    if (header !== undefined) {
      mapping[field] = header;
      used.add(header);
    }
  }
  return mapping;
}
