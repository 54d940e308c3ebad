import { requirePositive, SeeingInputError } from '../errors.js';

/** The coefficient sets, by the names the API, the analyzer's --response and the database use. */
export const RESPONSE_SETS = ['z-tilt', 'g-tilt', 'sarazin-roddier'] as const;
export type ResponseSet = (typeof RESPONSE_SETS)[number];

/** The one label table: each set's short label (screens) and the publication its coefficients come from. */
const RESPONSE_SET_TABLE: Record<ResponseSet, { label: string; source: string }> = {
  'z-tilt': { label: 'Tokovinin 2002, Z-tilt', source: 'PASP 114, 1156' },
  'g-tilt': { label: 'Tokovinin 2002, G-tilt', source: 'PASP 114, 1156' },
  'sarazin-roddier': { label: 'Sarazin & Roddier 1990', source: 'A&A 227, 294' },
};

/** Short label of each set, e.g. "Tokovinin 2002, Z-tilt" (the API's responseName, the forms' choices). */
export const RESPONSE_SET_LABELS = Object.fromEntries(RESPONSE_SETS.map((set) => [set, RESPONSE_SET_TABLE[set].label])) as Record<ResponseSet, string>;

/** Label with its source, written into reports so a number always says how it was made, e.g. "Tokovinin 2002, Z-tilt (PASP 114, 1156)". */
export const RESPONSE_SET_NAMES = Object.fromEntries(
  RESPONSE_SETS.map((set) => [set, `${RESPONSE_SET_TABLE[set].label} (${RESPONSE_SET_TABLE[set].source})`]),
) as Record<ResponseSet, string>;

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
