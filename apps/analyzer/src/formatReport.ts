import { MAX_NOISE_SHARE, type TelescopePrediction } from '@calmcrest/seeing-stats';
import type { AnalyzerReport } from '@calmcrest/seeing-stats/node';

const arcsec = (value: number): string => (Number.isFinite(value) ? `${value.toFixed(2)}″` : '–');
const centimetres = (value: number): string => (Number.isFinite(value) ? `${value.toFixed(1)} cm` : '–');
const percent = (fraction: number): string => `${(fraction * 100).toFixed(1)} %`;
const milliseconds = (value: number): string => (Number.isFinite(value) ? `${value.toFixed(2)} ms` : '–');

/** "95 % interval a – b, bootstrap over nights", marked approximate when it is, or why there is none. */
function intervalWords(interval: [number, number] | null, reason: string | null, format: (value: number) => string): string {
  if (interval === null) return reason ?? 'no interval';
  const words = `95 % interval ${format(interval[0])} – ${format(interval[1])}, bootstrap over nights`;
  return reason === null ? words : `${words}; ${reason}`;
}

/** The readable summary a field engineer reads before uploading: counts, statistics with units, rejected rows. */
export function formatReport(report: AnalyzerReport, fileName: string, telescope: TelescopePrediction | null = null): string {
  const lines: string[] = [];
  const { samples } = report;
  lines.push(`Calmcrest log check: ${fileName}`);
  // Warnings first and loud: each one can make the figures below mislead.
  for (const warning of report.warnings) lines.push(`WARNING (${warning.code}): ${warning.message}`);
  const measure = report.monitor.apertureMm !== undefined && report.monitor.baselineMm !== undefined
    ? `D ${report.monitor.apertureMm} mm, B ${report.monitor.baselineMm} mm, `
    : '';
  lines.push(`Monitor: ${measure}measured at ${report.monitor.wavelengthNm} nm; response: ${report.monitor.responseName}`);
  const filterWords = [`zenith ≤ ${report.filters.maxZenithDeg}°`];
  filterWords.push(report.filters.nightFilter ? `sun ≤ ${report.filters.sunMaxDeg}°` : 'no night filter (give --site-lat and --site-lon)');
  if (report.filters.minFlux !== null) filterWords.push(`flux ≥ ${report.filters.minFlux}`);
  filterWords.push(report.filters.leaveOutAnisotropic === false ? 'anisotropic samples kept (flagged)' : 'anisotropic samples left out');
  lines.push(`Filters: ${filterWords.join(', ')}`);
  const window = report.plausibility;
  lines.push(`Plausible: seeing ${window.minSeeingArcsec}″–${window.maxSeeingArcsec}″ (zenith, 500 nm), times ${window.earliestTimeUtc.slice(0, 10)} to ${window.latestTimeUtc.slice(0, 10)}`);
  lines.push('');
  if (report.file.preambleLines > 0) {
    const last = report.file.preambleLines;
    lines.push(`Preamble: ${last === 1 ? 'line 1' : `lines 1–${last}`} above the header line ${last + 1} skipped (not rows)`);
  }
  lines.push(`Rows read ${samples.read}: accepted ${samples.accepted}, rejected ${samples.rejected}`);
  const reasons = Object.entries(samples.rejectedByReason).sort((left, right) => right[1] - left[1]);
  for (const [reason, count] of reasons) lines.push(`  ${reason.padEnd(29)} ${String(count).padStart(8)}`);
  if (samples.anisotropic > 0) lines.push(`  (${samples.anisotropic} accepted samples flagged anisotropic, kept by --keep-anisotropic: their two axes disagree)`);
  if (samples.exposureCorrected + samples.exposureNotCorrectedNoisy > 0) {
    lines.push(`Exposure time: ${samples.exposureCorrected} accepted samples extrapolated to zero exposure from the τ and 2τ variances (ε(τ)^1.75 ε(2τ)^-0.75, Tokovinin 2002)`);
    lines.push(`  ${samples.exposureNotCorrectedNoisy} accepted samples left uncorrected as noise-dominated (ε(2τ) > ε(τ) on an axis)`);
  }
  if (!report.method.noiseSubtraction.startsWith('not applied')) {
    lines.push(`Centroid noise: 2σc² subtracted from each axis's variance before the reduction (samples with noise above ${MAX_NOISE_SHARE * 100} % of a variance rejected as noise_dominated)`);
  }
  if (samples.firstTimeUtc !== null && samples.lastTimeUtc !== null) lines.push(`Time span: ${samples.firstTimeUtc} to ${samples.lastTimeUtc}, ${report.nights} nights`);
  lines.push('');

  if (samples.accepted === 0) {
    lines.push('No sample was accepted, so there are no statistics. See the rejected rows below.');
  } else {
    const { seeing, r0, lognormal } = report;
    lines.push('Seeing at zenith, 500 nm (FWHM)');
    lines.push(`  mean ${arcsec(seeing.mean)}   median ${arcsec(seeing.median)}  (${intervalWords(seeing.medianCi95, report.interval.reason, arcsec)})`);
    lines.push(`  p10 ${arcsec(seeing.p10)}   p25 ${arcsec(seeing.p25)}   p75 ${arcsec(seeing.p75)}   p90 ${arcsec(seeing.p90)}`);
    const balanced = report.seasonBalanced;
    const missing = balanced.monthsMissing.length === 0 ? 'every calendar month covered' : `no samples in ${balanced.monthsMissing.join(', ')}`;
    lines.push(`  season-balanced median ${arcsec(balanced.medianArcsec)} (each covered calendar month weighs the same; ${missing})`);
    const nightly = report.nightlyMedians;
    lines.push(`  over nights (median of each night, ${nightly.nights} nights): median ${arcsec(nightly.median)}   p25 ${arcsec(nightly.p25)}   p75 ${arcsec(nightly.p75)}`);
    lines.push(`Fried parameter r0 at zenith, 500 nm`);
    lines.push(`  p10 ${centimetres(r0.p10)}   p25 ${centimetres(r0.p25)}   median ${centimetres(r0.median)}   p75 ${centimetres(r0.p75)}   p90 ${centimetres(r0.p90)}`);
    lines.push(`Log-normal fit: median ${arcsec(lognormal.median)}, σ(ln) ${lognormal.sigma.toFixed(3)}, KS distance ${lognormal.ks.toFixed(3)}`);
    if (telescope !== null) {
      const size = telescope.telescopeDiameterM === null ? 'a large telescope' : `a telescope of ${telescope.telescopeDiameterM} m diameter`;
      lines.push(`Predicted long-exposure FWHM in ${size} at ${telescope.wavelengthNm} nm, zenith, outer scale ${telescope.outerScaleM} m:`);
      lines.push(`  p10 ${arcsec(telescope.p10)}   p25 ${arcsec(telescope.p25)}   median ${arcsec(telescope.median)}   p75 ${arcsec(telescope.p75)}   p90 ${arcsec(telescope.p90)}`);
    }
    lines.push('Time below (share of samples)');
    for (const [threshold, fraction] of Object.entries(report.fractionBelow)) {
      lines.push(`  ${`${threshold}″`.padEnd(6)} ${percent(fraction).padStart(7)}  (${intervalWords(report.fractionBelowCi95[threshold] ?? null, report.interval.reason, percent)})`);
    }
    for (const [label, figures, format] of [['Coherence time τ0 at zenith, 500 nm', report.tau0, milliseconds], ['Isoplanatic angle θ0 at zenith, 500 nm', report.theta0, arcsec]] as const) {
      if (figures === null) continue;
      lines.push(`${label} (${figures.samples} samples with a value)`);
      lines.push(`  p10 ${format(figures.p10)}   p25 ${format(figures.p25)}   median ${format(figures.median)}   p75 ${format(figures.p75)}   p90 ${format(figures.p90)}`);
      lines.push(`  by season: ${figures.seasons.map((season) => `${season.code}${season.name === null ? '' : ` (${season.name})`} ${season.median === null ? '–' : format(season.median)}`).join('   ')}`);
    }
    lines.push('');
    lines.push('By season (night dates)       samples   nights   median     p25     p75');
    for (const season of report.seasons) {
      const name = `${season.code}${season.name === null ? '' : ` (${season.name})`}`;
      lines.push(`  ${name.padEnd(26)} ${String(season.samples).padStart(9)} ${String(season.nights).padStart(8)} ${arcsec(season.median ?? Number.NaN).padStart(8)} ${arcsec(season.p25 ?? Number.NaN).padStart(7)} ${arcsec(season.p75 ?? Number.NaN).padStart(7)}`);
    }
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
