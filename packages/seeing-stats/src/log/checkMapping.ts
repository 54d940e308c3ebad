import { LOG_FIELD_INFO, isLogField, type ColumnMapping } from './logFields.js';

/**
 * Problems with a mapping that a person can act on, in plain words; [] when the mapping can be read.
 * Checks: every mapped header exists, no header serves two fields, a time column, one complete measure
 * (both variances, or seeing, or r0), a pointing (zenith angle or airmass), and variances at twice the exposure
 * time only as a full pair beside the base-exposure pair of the same unit.
 */
export function checkMapping(mapping: ColumnMapping, headers: readonly string[]): string[] {
  const problems: string[] = [];
  const headerSet = new Set(headers);
  const fieldOfHeader = new Map<string, string>();
  for (const [field, header] of Object.entries(mapping)) {
    if (header === undefined) continue;
    if (!isLogField(field)) {
      problems.push(`"${field}" is not a Calmcrest log field; use one of the names in the README, "Log format".`);
      continue;
    }
    if (!headerSet.has(header)) {
      problems.push(`${field} is mapped to the column "${header}", but the file has no such column (columns: ${headers.map((name) => `"${name}"`).join(', ')}).`);
    }
    const earlier = fieldOfHeader.get(header);
    if (earlier !== undefined) problems.push(`The column "${header}" is mapped to both ${earlier} and ${field}; map each column to one field.`);
    else fieldOfHeader.set(header, field);
  }
  if (mapping.time_utc === undefined) {
    problems.push(`No column holds time_utc (${LOG_FIELD_INFO.time_utc.label}); map the column with the sample times to it.`);
  }
  if (mapping.date_utc !== undefined && mapping.time_utc === undefined) {
    problems.push(`date_utc is mapped to "${mapping.date_utc}" but no column holds the time of day; map it to time_utc.`);
  }
  const hasLongArcsec = mapping.var_long_arcsec2 !== undefined;
  const hasTransArcsec = mapping.var_trans_arcsec2 !== undefined;
  const hasLongPixel = mapping.var_long_px2 !== undefined;
  const hasTransPixel = mapping.var_trans_px2 !== undefined;
  if (hasLongArcsec !== hasTransArcsec) {
    problems.push('Only one of var_long_arcsec2 and var_trans_arcsec2 is mapped; seeing from variances needs both axes.');
  }
  if (hasLongPixel !== hasTransPixel) {
    problems.push('Only one of var_long_px2 and var_trans_px2 is mapped; seeing from variances needs both axes.');
  }
  // The variances at twice the exposure time are optional, but a half-mapped pair would silently switch the
  // exposure-time correction off, so it is reported like a half-mapped main pair.
  for (const unit of ['arcsec2', 'px2'] as const) {
    const long2x = mapping[`var_long_2x_${unit}`] !== undefined;
    const trans2x = mapping[`var_trans_2x_${unit}`] !== undefined;
    if (long2x !== trans2x) {
      problems.push(`Only one of var_long_2x_${unit} and var_trans_2x_${unit} is mapped; the exposure-time correction needs both axes at twice the exposure time.`);
    }
    const main = unit === 'arcsec2' ? hasLongArcsec && hasTransArcsec : hasLongPixel && hasTransPixel;
    if ((long2x || trans2x) && !main) {
      problems.push(`var_…_2x_${unit} (variances at twice the exposure time) are mapped without var_long_${unit} and var_trans_${unit}; map the variances at the base exposure time in the same unit too.`);
    }
  }
  // Centroid noise likewise: a half pair would silently skip the subtraction.
  for (const unit of ['arcsec2', 'px2'] as const) {
    const noiseLong = mapping[`noise_long_${unit}`] !== undefined;
    const noiseTrans = mapping[`noise_trans_${unit}`] !== undefined;
    if (noiseLong !== noiseTrans) {
      problems.push(`Only one of noise_long_${unit} and noise_trans_${unit} is mapped; the centroid-noise subtraction needs both axes.`);
    }
    const main = unit === 'arcsec2' ? hasLongArcsec && hasTransArcsec : hasLongPixel && hasTransPixel;
    if ((noiseLong || noiseTrans) && !main) {
      problems.push(`noise_…_${unit} (centroid-noise variances) are mapped without var_long_${unit} and var_trans_${unit}; give the noise in the unit of the variances.`);
    }
  }
  const hasMeasure = (hasLongArcsec && hasTransArcsec) || (hasLongPixel && hasTransPixel) || mapping.seeing_arcsec !== undefined || mapping.r0_cm !== undefined;
  if (!hasMeasure) {
    problems.push('No seeing measure is mapped: map both image-motion variances (var_long_… and var_trans_…), or seeing_arcsec, or r0_cm.');
  }
  if (mapping.zenith_deg === undefined && mapping.airmass === undefined) {
    problems.push('No pointing is mapped: map zenith_deg (zenith angle in degrees) or airmass, so samples can be reduced to zenith.');
  }
  return problems;
}
