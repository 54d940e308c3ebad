import type { TelescopePrediction } from '@calmcrest/seeing-stats';
import type { AnalyzerReport } from '@calmcrest/seeing-stats/node';

const arcsec = (value: number): string => (Number.isFinite(value) ? `${value.toFixed(2)}″` : '–');
const centimetres = (value: number): string => (Number.isFinite(value) ? `${value.toFixed(1)} cm` : '–');
const percent = (fraction: number): string => `${(fraction * 100).toFixed(1)} %`;

/** The readable summary a field engineer reads before uploading: counts, statistics with units, rejected rows. */
export function formatReport(report: AnalyzerReport, fileName: string, telescope: TelescopePrediction | null = null): string {
  const lines: string[] = [];
  const { samples } = report;
  lines.push(`Calmcrest log check: ${fileName}`);
  const measure = report.monitor.apertureMm !== undefined && report.monitor.baselineMm !== undefined
    ? `D ${report.monitor.apertureMm} mm, B ${report.monitor.baselineMm} mm, `
    : '';
  lines.push(`Monitor: ${measure}measured at ${report.monitor.wavelengthNm} nm; response: ${report.monitor.responseName}`);
  const filterWords = [`zenith ≤ ${report.filters.maxZenithDeg}°`];
  filterWords.push(report.filters.nightFilter ? `sun ≤ ${report.filters.sunMaxDeg}°` : 'no night filter (give --site-lat and --site-lon)');
  if (report.filters.minFlux !== null) filterWords.push(`flux ≥ ${report.filters.minFlux}`);
  lines.push(`Filters: ${filterWords.join(', ')}`);
  lines.push('');
  lines.push(`Rows read ${samples.read}: accepted ${samples.accepted}, rejected ${samples.rejected}`);
  const reasons = Object.entries(samples.rejectedByReason).sort((left, right) => right[1] - left[1]);
  for (const [reason, count] of reasons) lines.push(`  ${reason.padEnd(16)} ${String(count).padStart(8)}`);
  if (samples.anisotropic > 0) lines.push(`  (${samples.anisotropic} accepted samples flagged anisotropic: their two axes disagree)`);
  if (samples.exposureCorrected + samples.exposureNotCorrectedNoisy > 0) {
    lines.push(`Exposure time: ${samples.exposureCorrected} accepted samples extrapolated to zero exposure from the τ and 2τ variances (ε(τ)^1.75 ε(2τ)^-0.75, Tokovinin 2002)`);
    lines.push(`  ${samples.exposureNotCorrectedNoisy} accepted samples left uncorrected as noise-dominated (ε(2τ) > ε(τ) on an axis)`);
  }
  if (samples.firstTimeUtc !== null && samples.lastTimeUtc !== null) lines.push(`Time span: ${samples.firstTimeUtc} to ${samples.lastTimeUtc}, ${report.nights} nights`);
  lines.push('');

  if (samples.accepted === 0) {
    lines.push('No sample was accepted, so there are no statistics. See the rejected rows below.');
  } else {
    const { seeing, r0, lognormal } = report;
    lines.push('Seeing at zenith, 500 nm (FWHM)');
    lines.push(`  mean ${arcsec(seeing.mean)}   median ${arcsec(seeing.median)}  (95 % interval ${arcsec(seeing.medianCi95[0])} – ${arcsec(seeing.medianCi95[1])}, bootstrap over nights)`);
    if (report.nights < 5) {
      lines.push(`  (only ${report.nights} night${report.nights === 1 ? '' : 's'}: an interval from resampling nights cannot show night-to-night variation yet)`);
    }
    lines.push(`  p10 ${arcsec(seeing.p10)}   p25 ${arcsec(seeing.p25)}   p75 ${arcsec(seeing.p75)}   p90 ${arcsec(seeing.p90)}`);
    lines.push(`Fried parameter r0 at zenith, 500 nm`);
    lines.push(`  p10 ${centimetres(r0.p10)}   p25 ${centimetres(r0.p25)}   median ${centimetres(r0.median)}   p75 ${centimetres(r0.p75)}   p90 ${centimetres(r0.p90)}`);
    lines.push(`Log-normal fit: median ${arcsec(lognormal.median)}, σ(ln) ${lognormal.sigma.toFixed(3)}, KS distance ${lognormal.ks.toFixed(3)}`);
    if (telescope !== null) {
      const size = telescope.telescopeDiameterM === null ? 'a large telescope' : `a telescope of ${telescope.telescopeDiameterM} m diameter`;
      lines.push(`Predicted long-exposure FWHM in ${size} at ${telescope.wavelengthNm} nm, zenith, outer scale ${telescope.outerScaleM} m:`);
      lines.push(`  p10 ${arcsec(telescope.p10)}   p25 ${arcsec(telescope.p25)}   median ${arcsec(telescope.median)}   p75 ${arcsec(telescope.p75)}   p90 ${arcsec(telescope.p90)}`);
    }
    lines.push(`Time below: ${Object.entries(report.fractionBelow).map(([threshold, fraction]) => `${threshold}″ ${percent(fraction)}`).join('   ')}`);
    lines.push('');
    lines.push('By month (night dates)        samples   median     p25     p75');
    for (const month of report.monthly) {
      lines.push(`  ${month.month.padEnd(26)} ${String(month.samples).padStart(9)} ${arcsec(month.median).padStart(8)} ${arcsec(month.p25).padStart(7)} ${arcsec(month.p75).padStart(7)}`);
    }
    lines.push('By local solar hour           samples   median');
    for (const hour of report.hourly) {
      lines.push(`  ${`${String(hour.hour).padStart(2, '0')}h`.padEnd(26)} ${String(hour.samples).padStart(9)} ${arcsec(hour.median).padStart(8)}`);
    }
  }

  if (report.rejectedRows.length > 0) {
    lines.push('');
    const shown = report.rejectedRows.length < samples.rejected ? `first ${report.rejectedRows.length} of ${samples.rejected}` : `${samples.rejected}`;
    lines.push(`Rejected rows (${shown}):`);
    for (const row of report.rejectedRows) lines.push(`  line ${String(row.line).padStart(7)}  ${row.reason.padEnd(16)} ${row.message}`);
  }
  return `${lines.join('\n')}\n`;
}
