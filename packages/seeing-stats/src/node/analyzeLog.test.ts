// analyzeLog's exposure-time counts on a small log held in memory.
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { EXPOSURE_CORRECTION_METHOD } from '../log/createRowReader.js';
import { r0FromSeeing } from '../physics/r0FromSeeing.js';
import { responseCoefficients } from '../physics/responseCoefficients.js';
import { varianceFromR0 } from '../physics/varianceFromR0.js';
import { analyzeLog } from './analyzeLog.js';

const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' as const };
const { longitudinal, transverse } = responseCoefficients(200 / 60, 'z-tilt');
const variance = (seeingArcsec: number, coefficient: number): string => varianceFromR0(r0FromSeeing(seeingArcsec, 500), coefficient, 500, 60).toPrecision(9);

/** One row at zenith: the same seeing on both axes at τ and at 2τ. */
function row(minute: number, seeingArcsec: number, seeing2xArcsec: number, zenithDeg = 0): string {
  const time = new Date(Date.UTC(2025, 3, 8, 2, minute)).toISOString();
  return [time, variance(seeingArcsec, longitudinal), variance(seeingArcsec, transverse), variance(seeing2xArcsec, longitudinal), variance(seeing2xArcsec, transverse), zenithDeg].join(',');
}

const header = 'time_utc,var_long_arcsec2,var_trans_arcsec2,var_long_2x_arcsec2,var_trans_2x_arcsec2,zenith_deg';

describe('analyzeLog with interlaced exposures', () => {
  it('counts accepted samples extrapolated to zero exposure and those left uncorrected as noise-dominated', async () => {
    const lines = [
      header,
      row(0, 0.8, 0.75),
      row(1, 0.8, 0.75),
      row(2, 0.8, 0.85), // noisy: 2τ above τ
      row(3, 0.8, 0.75, 70), // corrected, but dropped by the 60° zenith limit: not counted among accepted samples
      `${new Date(Date.UTC(2025, 3, 8, 2, 4)).toISOString()},0.1,0.1,,0.1,0`, // empty 2τ cell
    ];
    const report = await analyzeLog(Readable.from([`${lines.join('\n')}\n`]), { monitor });
    expect(report.samples).toMatchObject({ read: 5, accepted: 3, rejected: 2, rejectedByReason: { zenith_limit: 1, missing_value: 1 }, exposureCorrected: 2, exposureNotCorrectedNoisy: 1 });
    expect(report.method.exposureCorrection).toBe(EXPOSURE_CORRECTION_METHOD);
    // two samples at 0.8397″ (seeing-physics.md §9 #11) and one kept at 0.80″: the median is the corrected value
    expect(report.seeing.median).toBeCloseTo(0.8397, 4);
    expect(report.rejectedRows.find((rejected) => rejected.reason === 'missing_value')?.message).toMatch(/var_long_2x_arcsec2/);
  });

  it('reports zero counts and says the rule was not applied for a log without 2τ columns', async () => {
    const text = `time_utc,seeing_arcsec,zenith_deg\n2025-04-08T02:00:00Z,0.8,10\n`;
    const report = await analyzeLog(Readable.from([text]), { monitor });
    expect(report.samples).toMatchObject({ accepted: 1, exposureCorrected: 0, exposureNotCorrectedNoisy: 0 });
    expect(report.method.exposureCorrection).toMatch(/^not applied/);
  });
});
