import { requirePositive, SeeingInputError } from '../errors.js';

export type ResponseSet = 'z-tilt' | 'g-tilt' | 'sarazin-roddier';

export const RESPONSE_SETS: readonly ResponseSet[] = ['z-tilt', 'g-tilt', 'sarazin-roddier'];

/** Human-readable name of each coefficient set, written into reports so a number always says how it was made. */
export const RESPONSE_SET_NAMES: Record<ResponseSet, string> = {
  'z-tilt': 'Tokovinin 2002 Z-tilt (PASP 114, 1156)',
  'g-tilt': 'Tokovinin 2002 G-tilt (PASP 114, 1156)',
  'sarazin-roddier': 'Sarazin & Roddier 1990 (A&A 227, 294)',
};

export interface ResponseCoefficients {
  longitudinal: number;
  transverse: number;
}

/**
 * DIMM response coefficients K_l, K_t in σ² = K λ² r0^(-5/3) D^(-1/3) for a baseline-to-aperture ratio b = B/D.
 * Z-tilt and G-tilt: Tokovinin 2002, PASP 114, 1156 (coefficients from memory, cross-checked in public code);
 * Sarazin & Roddier 1990, A&A 227, 294, rewritten as K = 0.358 (1 − c b^(-1/3)).
 * Needs b > 1 (sub-apertures cannot overlap). Example: responseCoefficients(0.2 / 0.06, 'z-tilt') → { longitudinal: 0.2338, transverse: 0.1699 }.
 */
export function responseCoefficients(baselineRatio: number, set: ResponseSet): ResponseCoefficients {
  requirePositive(baselineRatio, 'baselineRatio (baseline / aperture)', 'aperture diameters');
  if (baselineRatio <= 1) {
    throw new SeeingInputError(`baselineRatio (baseline / aperture) must be greater than 1 so the sub-apertures do not overlap, got ${baselineRatio}`);
  }
  // Written b ** (-1 / 3) with parentheses on purpose: b ** -1 / 3 is a known slip (seeing-physics.md §2.5).
  const cubeRootTerm = baselineRatio ** (-1 / 3);
  const sevenThirdsTerm = baselineRatio ** (-7 / 3);
  switch (set) {
    case 'z-tilt':
      return {
        longitudinal: 0.364 * (1 - 0.532 * cubeRootTerm - 0.024 * sevenThirdsTerm),
        transverse: 0.364 * (1 - 0.798 * cubeRootTerm + 0.018 * sevenThirdsTerm),
      };
    case 'g-tilt':
      return {
        longitudinal: 0.34 * (1 - 0.57 * cubeRootTerm - 0.04 * sevenThirdsTerm),
        transverse: 0.34 * (1 - 0.855 * cubeRootTerm + 0.03 * sevenThirdsTerm),
      };
    case 'sarazin-roddier': {
      // 2 λ² r0^(-5/3) [0.179 D^(-1/3) − 0.0968 B^(-1/3)] = 0.358 (1 − 0.0968/0.179 b^(-1/3)) λ² r0^(-5/3) D^(-1/3).
      return {
        longitudinal: 2 * (0.179 - 0.0968 * cubeRootTerm),
        transverse: 2 * (0.179 - 0.145 * cubeRootTerm),
      };
    }
    default:
      throw new SeeingInputError(`response must be one of ${RESPONSE_SETS.join(', ')}, got ${String(set)}`);
  }
}
