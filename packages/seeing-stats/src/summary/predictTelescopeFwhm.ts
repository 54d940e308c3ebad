import { vonKarmanFwhm } from '../physics/vonKarmanFwhm.js';
import type { SeeingSummary } from './summarizeSeeing.js';

export interface TelescopePrediction {
  outerScaleM: number;
  wavelengthNm: number;
  zenithDeg: number;
  telescopeDiameterM: number | null;
  /** Predicted long-exposure FWHM at the site's seeing percentiles (arcsec). */
  p10: number;
  p25: number;
  median: number;
  p75: number;
  p90: number;
}

/**
 * Long-exposure image FWHM a planned telescope would see at the site's seeing percentiles, with a von Kármán
 * outer scale (Tokovinin 2002 eq. 19; with a diameter, the ESO ETC-style Kolb factor). Each seeing percentile maps
 * to the same FWHM percentile because the prediction increases with seeing. Calmcrest's default L0 is 25 m.
 * Throws SeeingInputError for unusable settings.
 */
export function predictTelescopeFwhm(
  seeing: SeeingSummary['seeing'],
  options: { outerScaleM?: number; wavelengthNm: number; zenithDeg?: number; telescopeDiameterM?: number },
): TelescopePrediction {
  const outerScaleM = options.outerScaleM ?? 25;
  const zenithDeg = options.zenithDeg ?? 0;
  const predict = (seeingArcsec: number): number =>
    vonKarmanFwhm({ seeingArcsec, outerScaleM, wavelengthNm: options.wavelengthNm, zenithDeg, telescopeDiameterM: options.telescopeDiameterM });
  return {
    outerScaleM,
    wavelengthNm: options.wavelengthNm,
    zenithDeg,
    telescopeDiameterM: options.telescopeDiameterM ?? null,
    p10: predict(seeing.p10),
    p25: predict(seeing.p25),
    median: predict(seeing.median),
    p75: predict(seeing.p75),
    p90: predict(seeing.p90),
  };
}
