import { createWriteStream } from 'node:fs';
import { once } from 'node:events';
import { SeeingInputError, requirePositive } from '../errors.js';
import type { MonitorSettings } from '../log/createRowReader.js';
import { createSunAltitude, type SiteLocation } from '../log/sunAltitude.js';
import { REFERENCE_WAVELENGTH_NM } from '../physics/constants.js';
import { r0FromSeeing } from '../physics/r0FromSeeing.js';
import { responseCoefficients } from '../physics/responseCoefficients.js';
import { seeingAtZenithAngle } from '../physics/toZenith.js';
import { seeingAtWavelength } from '../physics/toWavelength.js';
import { varianceFromR0 } from '../physics/varianceFromR0.js';
import { createRandom, normalDeviate } from '../stats/random.js';

export interface SyntheticLogOptions {
  seed: number;
  site: SiteLocation;
  /** First evening, 'YYYY-MM-DD'. */
  startDate: string;
  nights: number;
  /** Typical seeing at zenith, 500 nm; nights scatter log-normally around it. */
  medianSeeingArcsec: number;
  /** Relative seasonal swing of the nightly level (0.15 = ±15 %), best in the local winter; default 0.1. */
  seasonalAmplitude?: number;
  cadenceSeconds?: number;
  monitor: MonitorSettings;
  /** Every n-th row is written broken (empty value, bad time, NaN, negative variance) to exercise the filters. */
  badRowEvery?: number;
  /** Share of nights lost to weather (no rows), default 0.2. */
  weatherLossFraction?: number;
  maxRows?: number;
}

const DAY_MS = 86_400_000;
/** log-normal scatter of nightly levels and the within-night wander (about 30 min correlation, Aristidi et al. 2009). */
const NIGHT_LOG_SCATTER = 0.28;
const WANDER_LOG_SCATTER = 0.18;
const WANDER_CORRELATION_MS = 30 * 60_000;
const AXIS_NOISE = 0.03;

/**
 * Writes an invented DIMM log in the native format for the demo and the bench: rows only while the sun is
 * below −18.5° at the site, nightly levels log-normal around the median with a seasonal cycle, a correlated
 * wander within each night, whole nights lost to weather; variances computed with the forward formula
 * σ² = K λ² r0^(-5/3) D^(-1/3) at the row's zenith angle and the monitor wavelength (pixel² when the monitor
 * has a pixel scale). Needs the monitor's aperture and baseline. Invented data: no real site's numbers.
 */
export async function writeSyntheticLog(path: string, options: SyntheticLogOptions): Promise<{ rows: number }> {
  const { monitor, site } = options;
  if (monitor.apertureMm === undefined || monitor.baselineMm === undefined) {
    throw new SeeingInputError('writeSyntheticLog needs monitor.apertureMm and monitor.baselineMm to compute variances');
  }
  requirePositive(options.medianSeeingArcsec, 'medianSeeingArcsec', 'arcseconds');
  requirePositive(options.nights, 'nights', 'nights');
  const startMs = Date.parse(`${options.startDate}T00:00:00Z`);
  if (Number.isNaN(startMs)) throw new SeeingInputError(`startDate must be a date like 2025-03-01, got ${options.startDate}`);
  const cadenceMs = (options.cadenceSeconds ?? 60) * 1000;
  requirePositive(cadenceMs, 'cadenceSeconds', 'seconds');
  const random = createRandom(options.seed);
  const sunAltitude = createSunAltitude(site);
  const coefficients = responseCoefficients(monitor.baselineMm / monitor.apertureMm, monitor.response);
  const pixelScale = monitor.pixelScaleArcsec;
  const varianceDivisor = pixelScale === undefined ? 1 : pixelScale * pixelScale;
  const seasonalAmplitude = options.seasonalAmplitude ?? 0.1;
  const weatherLoss = options.weatherLossFraction ?? 0.2;
  const maxRows = options.maxRows ?? Number.POSITIVE_INFINITY;
  const localNoonOffsetMs = 12 * 3_600_000 - (site.longitudeDeg / 15) * 3_600_000;
  const southern = site.latitudeDeg < 0;

  const output = createWriteStream(path);
  const unit = pixelScale === undefined ? 'arcsec2' : 'px2';
  let buffer = `# Invented DIMM log written by Calmcrest's synthetic generator (seed ${options.seed}); not real data.\n`;
  buffer += `# monitor: aperture ${monitor.apertureMm} mm, baseline ${monitor.baselineMm} mm, wavelength ${monitor.wavelengthNm} nm${pixelScale === undefined ? '' : `, pixel scale ${pixelScale} arcsec/px`}\n`;
  buffer += `time_utc,var_long_${unit},var_trans_${unit},zenith_deg,flux\n`;
  let rows = 0;
  const flush = async (): Promise<void> => {
    if (!output.write(buffer)) await once(output, 'drain');
    buffer = '';
  };

  for (let night = 0; night < options.nights && rows < maxRows; night += 1) {
    const noonMs = startMs + night * DAY_MS + localNoonOffsetMs;
    const nightLevelDeviate = normalDeviate(random);
    const lost = random() < weatherLoss;
    if (lost) continue;
    // Best seeing in the local winter: day-of-year phase flipped for the southern hemisphere.
    const dayOfYear = (noonMs / DAY_MS) % 365.25;
    const winterPhase = Math.cos((2 * Math.PI * (dayOfYear - (southern ? 196 : 15))) / 365.25);
    const nightMedian = options.medianSeeingArcsec * Math.exp(NIGHT_LOG_SCATTER * nightLevelDeviate) * (1 - seasonalAmplitude * winterPhase);
    const pointingPhase = random() * 2 * Math.PI;
    let wander = WANDER_LOG_SCATTER * normalDeviate(random);
    const keep = Math.exp(-cadenceMs / WANDER_CORRELATION_MS);
    for (let timeMs = noonMs; timeMs < noonMs + DAY_MS && rows < maxRows; timeMs += cadenceMs) {
      if (sunAltitude(timeMs) > -18.5) continue;
      wander = keep * wander + Math.sqrt(1 - keep * keep) * WANDER_LOG_SCATTER * normalDeviate(random);
      const seeingZenithArcsec = nightMedian * Math.exp(wander);
      // The monitor follows a bright star that drifts between 8° and 52° from the zenith.
      const zenithDeg = 30 + 22 * Math.sin(pointingPhase + (2 * Math.PI * (timeMs - noonMs)) / (7 * 3_600_000));
      const seeingThereArcsec = seeingAtWavelength(seeingAtZenithAngle(seeingZenithArcsec, zenithDeg), REFERENCE_WAVELENGTH_NM, monitor.wavelengthNm);
      const r0ThereCm = r0FromSeeing(seeingThereArcsec, monitor.wavelengthNm);
      const varianceLong = (varianceFromR0(r0ThereCm, coefficients.longitudinal, monitor.wavelengthNm, monitor.apertureMm) * (1 + AXIS_NOISE * normalDeviate(random))) / varianceDivisor;
      const varianceTrans = (varianceFromR0(r0ThereCm, coefficients.transverse, monitor.wavelengthNm, monitor.apertureMm) * (1 + AXIS_NOISE * normalDeviate(random))) / varianceDivisor;
      const flux = Math.round(24000 * Math.exp(0.25 * normalDeviate(random)));
      rows += 1;
      const time = new Date(timeMs).toISOString().slice(0, 19) + 'Z';
      if (options.badRowEvery !== undefined && rows % options.badRowEvery === 0) {
        buffer += brokenRow(rows / options.badRowEvery, time, varianceLong, varianceTrans, zenithDeg, flux);
      } else {
        buffer += `${time},${varianceLong.toPrecision(6)},${varianceTrans.toPrecision(6)},${zenithDeg.toFixed(2)},${flux}\n`;
      }
      if (buffer.length > 1 << 20) await flush();
    }
  }
  await flush();
  output.end();
  await once(output, 'finish');
  return { rows };
}

/** Cycles through the kinds of damage real logs show. */
function brokenRow(index: number, time: string, varianceLong: number, varianceTrans: number, zenithDeg: number, flux: number): string {
  switch (index % 4) {
    case 0:
      return `${time},,${varianceTrans.toPrecision(6)},${zenithDeg.toFixed(2)},${flux}\n`;
    case 1:
      return `not-a-time,${varianceLong.toPrecision(6)},${varianceTrans.toPrecision(6)},${zenithDeg.toFixed(2)},${flux}\n`;
    case 2:
      return `${time},NaN,${varianceTrans.toPrecision(6)},${zenithDeg.toFixed(2)},${flux}\n`;
    default:
      return `${time},${(-varianceLong).toPrecision(6)},${varianceTrans.toPrecision(6)},${zenithDeg.toFixed(2)},${flux}\n`;
  }
}
