// The row reader's exposure-time correction from interlaced exposures (variances at τ and 2τ).
import { describe, expect, it } from 'vitest';
import { LogFormatError } from '../errors.js';
import { exposureTimeCorrection } from '../physics/exposureTimeCorrection.js';
import { r0FromSeeing } from '../physics/r0FromSeeing.js';
import { responseCoefficients, type ResponseSet } from '../physics/responseCoefficients.js';
import { seeingFromR0 } from '../physics/seeingFromR0.js';
import { seeingAtWavelength } from '../physics/toWavelength.js';
import { seeingAtZenithAngle, seeingToZenith } from '../physics/toZenith.js';
import { varianceFromR0 } from '../physics/varianceFromR0.js';
import { createRandom, normalDeviate } from '../stats/random.js';
import { checkMapping } from './checkMapping.js';
import { createRowReader, MAX_EXPOSURE_CORRECTION_FACTOR, MAX_NOISE_SHARE, type LogSample, type MonitorSettings, type RowResult } from './createRowReader.js';
import { proposeMapping } from './proposeMapping.js';

const monitor: MonitorSettings = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' };
const headers = ['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'var_long_2x_arcsec2', 'var_trans_2x_arcsec2', 'zenith_deg'];
const reader = createRowReader({ headers, mapping: proposeMapping(headers), monitor });
const singleExposureReader = createRowReader({ headers, mapping: { time_utc: 'time_utc', var_long_arcsec2: 'var_long_arcsec2', var_trans_arcsec2: 'var_trans_arcsec2', zenith_deg: 'zenith_deg' }, monitor });
const TIME = '2025-03-01T00:00:00Z';

function sampleOf(result: RowResult): LogSample {
  if (!result.ok) throw new Error(`expected a sample, got ${result.reason}: ${result.message}`);
  return result.sample;
}

/** The variance a monitor logs on one axis when it sees this seeing (at its own zenith angle and wavelength). */
function varianceForSeeing(seeingArcsec: number, coefficient: number, wavelengthNm: number, apertureMm: number): number {
  return varianceFromR0(r0FromSeeing(seeingArcsec, wavelengthNm), coefficient, wavelengthNm, apertureMm);
}

const { longitudinal, transverse } = responseCoefficients(200 / 60, 'z-tilt');
const row = (seeingLong: number, seeingTrans: number, seeingLong2x: number, seeingTrans2x: number, zenithDeg = 0): string[] => [
  TIME,
  String(varianceForSeeing(seeingLong, longitudinal, 500, 60)),
  String(varianceForSeeing(seeingTrans, transverse, 500, 60)),
  String(varianceForSeeing(seeingLong2x, longitudinal, 500, 60)),
  String(varianceForSeeing(seeingTrans2x, transverse, 500, 60)),
  String(zenithDeg),
];

describe('exposure-time correction in the row reader', () => {
  it('proposes the native names of the variances at twice the exposure time', () => {
    expect(proposeMapping(headers)).toMatchObject({ var_long_2x_arcsec2: 'var_long_2x_arcsec2', var_trans_2x_arcsec2: 'var_trans_2x_arcsec2' });
    expect(proposeMapping(['time_utc', 'VAR_LONG_2X_PX2', 'var_trans_2x_px2'])).toMatchObject({ var_long_2x_px2: 'VAR_LONG_2X_PX2', var_trans_2x_px2: 'var_trans_2x_px2' });
  });

  it('gives 0.8397″ for 0.80″ at τ and 0.75″ at 2τ on both axes', () => {
    // seeing-physics.md §9 #11: ε(τ) = 0.80″, ε(2τ) = 0.75″ → ε0 = 0.8397″ (1.75/−0.75 rule, exponents from memory)
    const sample = sampleOf(reader(row(0.8, 0.8, 0.75, 0.75), 2));
    expect(sample.exposureCorrection).toBe('applied');
    expect(sample.seeingLongArcsec).toBeCloseTo(0.8397, 4);
    expect(sample.seeingTransArcsec).toBeCloseTo(0.8397, 4);
    expect(sample.seeingArcsec).toBeCloseTo(0.8397, 4);
    expect(sample.r0Cm).toBeCloseTo(r0FromSeeing(sample.seeingArcsec, 500), 9);
  });

  it('corrects each axis before the axes are averaged', () => {
    const sample = sampleOf(reader(row(0.8, 0.7, 0.75, 0.6), 2));
    const long = exposureTimeCorrection(0.8, 0.75);
    const trans = exposureTimeCorrection(0.7, 0.6);
    expect(sample.seeingLongArcsec).toBeCloseTo(long, 9);
    expect(sample.seeingTransArcsec).toBeCloseTo(trans, 9);
    expect(sample.seeingArcsec).toBeCloseTo((long + trans) / 2, 9);
    // averaging first and correcting the means would give a different number: the order matters
    expect(Math.abs(exposureTimeCorrection(0.75, 0.675) - sample.seeingArcsec)).toBeGreaterThan(1e-4);
  });

  it('gives the same seeing whether the rule is applied before or after the reduction to zenith and 500 nm', () => {
    // The rule's exponents sum to 1, so a common factor passes through it; here the raw monitor seeing is
    // corrected first and reduced afterwards with the independent physics functions.
    const wavelengthNm = 650;
    const zenithDeg = 47;
    const wideMonitor: MonitorSettings = { apertureMm: 80, baselineMm: 250, wavelengthNm, response: 'g-tilt' };
    const coefficients = responseCoefficients(250 / 80, 'g-tilt');
    const wideReader = createRowReader({ headers, mapping: proposeMapping(headers), monitor: wideMonitor });
    const raw = { long: 1.1, trans: 1.02, long2x: 0.97, trans2x: 0.95 };
    const sample = sampleOf(
      wideReader(
        [
          TIME,
          String(varianceForSeeing(raw.long, coefficients.longitudinal, wavelengthNm, 80)),
          String(varianceForSeeing(raw.trans, coefficients.transverse, wavelengthNm, 80)),
          String(varianceForSeeing(raw.long2x, coefficients.longitudinal, wavelengthNm, 80)),
          String(varianceForSeeing(raw.trans2x, coefficients.transverse, wavelengthNm, 80)),
          String(zenithDeg),
        ],
        2,
      ),
    );
    const reduce = (seeingArcsec: number): number => seeingAtWavelength(seeingToZenith(seeingArcsec, zenithDeg), wavelengthNm, 500);
    expect(Math.abs((sample.seeingLongArcsec ?? 0) / reduce(exposureTimeCorrection(raw.long, raw.long2x)) - 1)).toBeLessThan(1e-12);
    expect(Math.abs((sample.seeingTransArcsec ?? 0) / reduce(exposureTimeCorrection(raw.trans, raw.trans2x)) - 1)).toBeLessThan(1e-12);
  });

  it('recovers the zero-exposure seeing of known r0 values to 1e-9 through a smoothing law the rule inverts exactly', () => {
    // Law ln ε(τ) = ln ε0 + c τ^p with p = log2(7/3): then ε(τ)^1.75 ε(2τ)^(-0.75) = ε0 exp(c τ^p (1.75 − 0.75·2^p)) = ε0,
    // since 0.75 · 7/3 = 1.75 (seeing-physics.md §3.1 [DERIVED]). c < 0: a longer exposure smooths more.
    const smoothingPower = Math.log2(7 / 3);
    const random = createRandom(31);
    const responses: ResponseSet[] = ['z-tilt', 'g-tilt', 'sarazin-roddier'];
    for (let index = 0; index < 400; index += 1) {
      const r0ReferenceCm = 4 + 20 * random(); // zero exposure, zenith, 500 nm
      const wavelengthNm = 400 + 500 * random();
      const zenithDeg = 65 * random();
      const apertureMm = 40 + 60 * random();
      const baselineMm = apertureMm * (2.2 + 3 * random());
      const response = responses[index % 3] ?? 'z-tilt';
      const exposureMs = 2 + 8 * random();
      // Each axis smooths at its own rate (wind along or across the baseline), so the axes differ at τ and 2τ.
      const rateLong = -(0.0005 + 0.01 * random());
      const rateTrans = -(0.0005 + 0.01 * random());
      const seeingZeroThere = seeingAtWavelength(seeingAtZenithAngle(seeingFromR0(r0ReferenceCm, 500), zenithDeg), 500, wavelengthNm);
      const smoothed = (rate: number, exposure: number): number => seeingZeroThere * Math.exp(rate * exposure ** smoothingPower);
      const coefficients = responseCoefficients(baselineMm / apertureMm, response);
      const variance = (seeingArcsec: number, coefficient: number): string => String(varianceForSeeing(seeingArcsec, coefficient, wavelengthNm, apertureMm));
      const trialReader = createRowReader({ headers, mapping: proposeMapping(headers), monitor: { apertureMm, baselineMm, wavelengthNm, response } });
      const sample = sampleOf(
        trialReader(
          [
            TIME,
            variance(smoothed(rateLong, exposureMs), coefficients.longitudinal),
            variance(smoothed(rateTrans, exposureMs), coefficients.transverse),
            variance(smoothed(rateLong, 2 * exposureMs), coefficients.longitudinal),
            variance(smoothed(rateTrans, 2 * exposureMs), coefficients.transverse),
            String(zenithDeg),
          ],
          2,
        ),
      );
      expect(sample.exposureCorrection).toBe('applied');
      expect(Math.abs(sample.r0Cm / r0ReferenceCm - 1)).toBeLessThan(1e-9);
      expect(Math.abs((sample.seeingLongArcsec ?? 0) / seeingFromR0(r0ReferenceCm, 500) - 1)).toBeLessThan(1e-9);
      expect(Math.abs((sample.seeingTransArcsec ?? 0) / seeingFromR0(r0ReferenceCm, 500) - 1)).toBeLessThan(1e-9);
    }
  });

  it('brings the seeing of an independent forward model (exponentially correlated image motion) to within 2 % of its zero-exposure value', () => {
    // Forward model that does not contain the rule: the image motion on an axis is an Ornstein–Uhlenbeck process
    // with correlation time T (autocorrelation e^(−|t|/T)); an exposure τ records its mean, whose variance is
    // σ0² · 2 (T/τ)² (τ/T − 1 + e^(−τ/T)) (variance of the time average of an exponentially correlated process;
    // textbook result, from memory, checked by simulation in the next test). Seeing ∝ variance^(3/5).
    // The rule is exact only for its own law (test above); here it must still remove most of the bias.
    const smoothing = (exposureOverT: number): number => 2 * (exposureOverT ** -2) * (exposureOverT - 1 + Math.exp(-exposureOverT));
    const seeingZero = 0.9;
    for (const exposureOverT of [0.05, 0.1, 0.2, 0.3]) {
      const seeingShort = seeingZero * smoothing(exposureOverT) ** (3 / 5);
      const seeingDouble = seeingZero * smoothing(2 * exposureOverT) ** (3 / 5);
      const sample = sampleOf(reader(row(seeingShort, seeingShort, seeingDouble, seeingDouble), 2));
      expect(sample.exposureCorrection).toBe('applied');
      const correctedError = Math.abs(sample.seeingArcsec / seeingZero - 1);
      const uncorrectedError = Math.abs(seeingShort / seeingZero - 1);
      expect(correctedError, `τ/T = ${exposureOverT}`).toBeLessThan(0.02);
      expect(correctedError, `τ/T = ${exposureOverT}`).toBeLessThan(0.35 * uncorrectedError);
    }
  });

  it('uses a forward-model variance that a seeded simulation of the correlated motion reproduces', () => {
    // AR(1) sampling of the Ornstein–Uhlenbeck process (step T/100), exposures of τ = 0.2 T and 2τ as block means.
    const random = createRandom(7);
    const stepsPerT = 100;
    const decay = Math.exp(-1 / stepsPerT);
    const innovation = Math.sqrt(1 - decay * decay);
    const blockVariance = (blockSteps: number, blocks: number): number => {
      let position = normalDeviate(random);
      let sumSquares = 0;
      for (let block = 0; block < blocks; block += 1) {
        let sum = 0;
        for (let step = 0; step < blockSteps; step += 1) {
          position = decay * position + innovation * normalDeviate(random);
          sum += position;
        }
        sumSquares += (sum / blockSteps) ** 2;
      }
      return sumSquares / blocks;
    };
    const smoothing = (exposureOverT: number): number => 2 * (exposureOverT ** -2) * (exposureOverT - 1 + Math.exp(-exposureOverT));
    // 20 000 blocks: the variance estimate's relative standard error is about √(2/20 000) = 1 %, plus correlation.
    expect(Math.abs(blockVariance(20, 20_000) / smoothing(0.2) - 1)).toBeLessThan(0.04);
    expect(Math.abs(blockVariance(40, 20_000) / smoothing(0.4) - 1)).toBeLessThan(0.04);
  });

  it(`rejects a sample whose correction would exceed ×${MAX_EXPOSURE_CORRECTION_FACTOR}, under its own reason`, () => {
    // The case of the issue: a 2τ variance at 10 % of the τ variance asks for ×10^(0.6·0.75) = ×2.82 (1.01″ → 2.85″).
    const tenPercent = [TIME, '0.2', '0.2', '0.02', '0.02', '0'];
    const rejected = reader(tenPercent, 5);
    expect(rejected.ok ? 'ok' : rejected.reason).toBe('exposure_correction_too_large');
    if (!rejected.ok) expect(rejected.message).toMatch(/×2\.82/);
    // Just inside the cap: ε(τ)/ε(2τ) = 1.7 gives ×1.7^0.75 = ×1.489, applied.
    const inside = sampleOf(reader(row(0.85, 0.85, 0.5, 0.5), 2));
    expect(inside.exposureCorrection).toBe('applied');
    expect(inside.seeingArcsec).toBeCloseTo(0.85 * 1.7 ** 0.75, 9);
    // Just outside on one axis only: ε(τ)/ε(2τ) = 1.75 on the transverse axis gives ×1.522.
    const outside = reader(row(0.85, 0.875, 0.8, 0.5), 2);
    expect(outside.ok ? 'ok' : outside.reason).toBe('exposure_correction_too_large');
  });

  it('keeps the uncorrected seeing of a noise-dominated pair and marks it', () => {
    // seeing-physics.md §3.1: ε(2τ) > ε(τ) means noise-dominated or non-stationary data; flag, do not extrapolate.
    const fields = row(0.8, 0.7, 0.75, 0.72); // transverse axis: 0.72″ at 2τ > 0.70″ at τ
    const sample = sampleOf(reader(fields, 2));
    const uncorrected = sampleOf(singleExposureReader(fields, 2));
    expect(sample.exposureCorrection).toBe('not_applied_noisy');
    expect(sample.seeingArcsec).toBe(uncorrected.seeingArcsec);
    expect(sample.seeingLongArcsec).toBe(uncorrected.seeingLongArcsec);
    expect(uncorrected.exposureCorrection).toBeNull();
    // equal seeing at τ and 2τ is not noise: the rule returns ε(τ) unchanged
    const steady = sampleOf(reader(row(0.8, 0.7, 0.8, 0.7), 2));
    expect(steady.exposureCorrection).toBe('applied');
    expect(steady.seeingArcsec).toBeCloseTo(uncorrected.seeingArcsec, 12);
  });

  it('reads variances at twice the exposure time in pixel² with the plate scale', () => {
    const pixelHeaders = ['time_utc', 'var_long_px2', 'var_trans_px2', 'var_long_2x_px2', 'var_trans_2x_px2', 'zenith_deg'];
    const pixelReader = createRowReader({ headers: pixelHeaders, mapping: proposeMapping(pixelHeaders), monitor: { ...monitor, pixelScaleArcsec: 0.5 } });
    const arcsecFields = row(0.8, 0.7, 0.75, 0.6, 20);
    const pixelFields = arcsecFields.map((field, column) => (column >= 1 && column <= 4 ? String(Number(field) / 0.25) : field));
    const fromPixels = sampleOf(pixelReader(pixelFields, 2));
    expect(fromPixels.exposureCorrection).toBe('applied');
    expect(fromPixels.seeingArcsec).toBeCloseTo(sampleOf(reader(arcsecFields, 2)).seeingArcsec, 12);
  });

  it('rejects an empty 2τ cell as missing and a zero, negative or NaN one as non-physical', () => {
    const good = row(0.8, 0.7, 0.75, 0.6);
    const cases: [number, string, string][] = [
      [3, '', 'missing_value'],
      [4, 'abc', 'missing_value'],
      [3, '0', 'non_physical'],
      [4, '-0.01', 'non_physical'],
      [3, 'NaN', 'non_physical'],
      [4, 'inf', 'non_physical'],
    ];
    for (const [column, text, reason] of cases) {
      const fields = good.map((field, index) => (index === column ? text : field));
      const result = reader(fields, 9);
      expect(result.ok ? 'ok' : result.reason, `${headers[column] ?? ''}="${text}"`).toBe(reason);
      if (!result.ok) expect(result.message).toMatch(/2x|twice the exposure/);
    }
    const short = reader(good.slice(0, 3), 9); // a row cut off before the 2τ columns
    expect(short.ok ? 'ok' : short.reason).toBe('missing_value');
  });

  it('is null when the log gives seeing directly, even with 2τ variance columns mapped', () => {
    // Without the monitor geometry the variances cannot be read, so the reader uses seeing_arcsec.
    const mixed = [...headers, 'seeing_arcsec'];
    const seeingReader = createRowReader({ headers: mixed, mapping: proposeMapping(mixed), monitor: { wavelengthNm: 500, response: 'z-tilt' } });
    const sample = sampleOf(seeingReader([...row(0.8, 0.7, 0.75, 0.6), '0.9'], 2));
    expect(sample.exposureCorrection).toBeNull();
    expect(sample.seeingArcsec).toBeCloseTo(0.9, 12);
  });

  it('refuses a half-mapped 2τ pair and 2τ columns in a unit whose base variances are not mapped', () => {
    const oneAxis = checkMapping({ time_utc: 'time_utc', var_long_arcsec2: 'a', var_trans_arcsec2: 'b', var_long_2x_arcsec2: 'c', zenith_deg: 'z' }, ['time_utc', 'a', 'b', 'c', 'z']);
    expect(oneAxis.join(' ')).toMatch(/Only one of var_long_2x_arcsec2 and var_trans_2x_arcsec2/);
    const wrongUnit = checkMapping({ time_utc: 't', var_long_arcsec2: 'a', var_trans_arcsec2: 'b', var_long_2x_px2: 'c', var_trans_2x_px2: 'd', zenith_deg: 'z' }, ['t', 'a', 'b', 'c', 'd', 'z']);
    expect(wrongUnit.join(' ')).toMatch(/without var_long_px2 and var_trans_px2/);
    expect(() => createRowReader({ headers: ['time_utc', 'a', 'b', 'c', 'z'], mapping: { time_utc: 'time_utc', var_long_arcsec2: 'a', var_trans_arcsec2: 'b', var_long_2x_arcsec2: 'c', zenith_deg: 'z' }, monitor })).toThrow(LogFormatError);
    expect(checkMapping(proposeMapping(headers), headers)).toEqual([]);
  });
});

describe('centroid-noise subtraction in the row reader', () => {
  const noiseHeaders = ['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'noise_long_arcsec2', 'noise_trans_arcsec2', 'zenith_deg'];
  const noiseReader = createRowReader({ headers: noiseHeaders, mapping: proposeMapping(noiseHeaders), monitor });

  it('subtracts twice the one-image noise variance: σ_meas = 0.30″, σ_c = 0.05″ gives 0.4792″ instead of 0.4959″', () => {
    // seeing-physics.md §3.2 worked example [DERIVED]: σ_atm = √(0.30² − 2·0.05²) = 0.2915″; Z-tilt, D = 6 cm,
    // B = 20 cm: seeing 0.4959″ → 0.4792″ (§9 #9 and #12; the rule σ²_atm = σ²_meas − 2σc² is from memory).
    const sample = sampleOf(noiseReader([TIME, '0.09', '0.09', '0.0025', '0.0025', '0'], 2));
    expect(sample.seeingLongArcsec).toBeCloseTo(0.4792, 4);
    const without = sampleOf(singleExposureReader([TIME, '0.09', '0.09', '0', '0', '0'], 2));
    expect(without.seeingLongArcsec).toBeCloseTo(0.4959, 4);
  });

  it(`rejects a sample whose noise is more than ${MAX_NOISE_SHARE * 100} % of a measured variance as noise_dominated`, () => {
    // 2 × 0.0095 / 0.09 = 21 %: over the share (seeing-physics.md §6.3 recommends 2σc²/σ²_meas < 0.2, from memory)
    const over = noiseReader([TIME, '0.09', '0.09', '0.001', '0.0095', '0'], 2);
    expect(over.ok ? 'ok' : over.reason).toBe('noise_dominated');
    if (!over.ok) expect(over.message).toMatch(/21 %.*transverse/);
    // 2 × 0.009 / 0.09 = 20 % exactly: the boundary passes
    expect(noiseReader([TIME, '0.09', '0.09', '0.009', '0.009', '0'], 2).ok).toBe(true);
    // a noise larger than the variance can never be subtracted (§3.2: reject, do not clip to zero)
    const larger = noiseReader([TIME, '0.09', '0.09', '0.1', '0.1', '0'], 2);
    expect(larger.ok ? 'ok' : larger.reason).toBe('noise_dominated');
    const negative = noiseReader([TIME, '0.09', '0.09', '-0.001', '0.001', '0'], 2);
    expect(negative.ok ? 'ok' : negative.reason).toBe('non_physical');
    const blank = noiseReader([TIME, '0.09', '0.09', '', '0.001', '0'], 2);
    expect(blank.ok ? 'ok' : blank.reason).toBe('missing_value');
  });

  it('reads noise in pixel² with pixel² variances, and refuses a half pair or a pair in the other unit', () => {
    const pixelHeaders = ['time_utc', 'var_long_px2', 'var_trans_px2', 'noise_long_px2', 'noise_trans_px2', 'zenith_deg'];
    const pixelReader = createRowReader({ headers: pixelHeaders, mapping: proposeMapping(pixelHeaders), monitor: { ...monitor, pixelScaleArcsec: 0.5 } });
    // 0.09 arcsec² = 0.36 px² at 0.5″/px; 0.0025 arcsec² = 0.01 px²
    expect(sampleOf(pixelReader([TIME, '0.36', '0.36', '0.01', '0.01', '0'], 2)).seeingLongArcsec).toBeCloseTo(0.4792, 4);
    const half = checkMapping({ time_utc: 't', var_long_arcsec2: 'a', var_trans_arcsec2: 'b', noise_long_arcsec2: 'n', zenith_deg: 'z' }, ['t', 'a', 'b', 'n', 'z']);
    expect(half.join(' ')).toMatch(/Only one of noise_long_arcsec2 and noise_trans_arcsec2/);
    const otherUnit = checkMapping({ time_utc: 't', var_long_arcsec2: 'a', var_trans_arcsec2: 'b', noise_long_px2: 'n', noise_trans_px2: 'm', zenith_deg: 'z' }, ['t', 'a', 'b', 'n', 'm', 'z']);
    expect(otherUnit.join(' ')).toMatch(/noise_…_px2 .* without var_long_px2/);
  });
});
