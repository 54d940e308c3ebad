import { SeeingInputError } from '../errors.js';
import { DEFAULT_FILTERS, type FilterSettings } from '../log/filterReason.js';
import { MINIMUM_NIGHTS_FOR_INTERVAL } from '../stats/nightIntervalStatus.js';
import { MONTH_NAMES } from '../summary/seasonBalancedMedian.js';

/** Fewer calendar months with nights at both sites than this, and a pair's comparison rests on too little of the year. */
export const MINIMUM_OVERLAP_MONTHS = 3;
/** A month with fewer nights than this at a site is thinly covered: its monthly figure is a handful of nights. */
export const THIN_MONTH_NIGHTS = 5;

export type ComparisonWarningCode =
  | 'few_overlap_months'
  | 'thin_months'
  | 'different_heights'
  | 'different_response_sets'
  | 'too_few_nights'
  | 'non_standard_filters';

export interface ComparisonWarning {
  code: ComparisonWarningCode;
  /** One sentence a person can act on. */
  message: string;
}

/** What the warnings need to know about one compared site (or campaign). */
export interface ComparedSiteFacts {
  name: string;
  /** The nights with accepted samples in the window, named 'YYYY-MM-DD' as summarizeSeeing's nightly table names them. */
  nightLabels: readonly string[];
  /** Monitor heights above ground (m; null when not recorded), one per campaign pooled into the row. */
  monitorHeightsM: readonly (number | null)[];
  /** Response-set labels, one per campaign pooled into the row. */
  responseSets: readonly string[];
}

export interface ComparisonWarnings {
  /** Warnings that concern one row, in the order of the sites given. */
  sites: ComparisonWarning[][];
  /** Warnings that concern one pair (indexes into the sites given, a < b). */
  pairs: { a: number; b: number; warnings: ComparisonWarning[] }[];
  /** Warnings that concern the whole comparison. */
  general: ComparisonWarning[];
}

const heightText = (heights: readonly (number | null)[]): string =>
  [...new Set(heights.map((height) => (height === null ? 'unknown height' : `${height} m`)))].join(' and ');
const monthName = (month: string): string => `${MONTH_NAMES[Number(month.slice(5, 7)) - 1] ?? month} ${month.slice(0, 4)}`;

/**
 * The warnings that stop a careless conclusion from a side-by-side comparison, each a code and a sentence, placed
 * where they belong:
 * - per pair: the two sites share nights in fewer than MINIMUM_OVERLAP_MONTHS (3) calendar months, so their
 *   difference mixes seasons and weather (comparing on simultaneous periods: seeing-physics.md §6.4);
 * - per row: months with fewer than THIN_MONTH_NIGHTS (5) nights (named); a monitor height above ground that differs
 *   from another row's (seeing improves with height, seeing-physics.md §10.6); a response coefficient set that differs
 *   from another row's (the choice moves seeing by 7–10 %, seeing-physics.md §2.3); fewer than 10 nights (no interval);
 * - general: filters other than the standard ones (DEFAULT_FILTERS).
 * The thresholds 3 months and 5 nights are Calmcrest's choice (common practice, no source).
 * Throws SeeingInputError for a night label that is not 'YYYY-MM-DD'.
 * Example: two rows at 6 m and 2 m → each row gets 'different_heights' naming both heights.
 */
export function comparisonWarnings(
  sites: readonly ComparedSiteFacts[],
  filters: Pick<FilterSettings, 'maxZenithDeg' | 'sunMaxDeg' | 'minFlux'> & { leaveOutAnisotropic?: boolean } = DEFAULT_FILTERS,
): ComparisonWarnings {
  const monthsOf = sites.map((site) => nightsByMonth(site));
  const rowWarnings = sites.map((site, index): ComparisonWarning[] => {
    const warnings: ComparisonWarning[] = [];
    const nights = site.nightLabels.length;
    const thin = (monthsOf[index] ?? []).filter((entry) => entry.nights < THIN_MONTH_NIGHTS);
    if (thin.length > 0) {
      warnings.push({
        code: 'thin_months',
        message: `${site.name}: ${thin.map((entry) => `${monthName(entry.month)} (${entry.nights} ${entry.nights === 1 ? 'night' : 'nights'})`).join(', ')} ${thin.length === 1 ? 'is' : 'are'} thinly covered (fewer than ${THIN_MONTH_NIGHTS} nights); those months' figures rest on a few nights.`,
      });
    }
    const ownHeights = heightText(site.monitorHeightsM);
    const otherHeights = sites.filter((other) => other !== site && heightText(other.monitorHeightsM) !== ownHeights);
    if (otherHeights.length > 0 && site.monitorHeightsM.length > 0) {
      warnings.push({
        code: 'different_heights',
        message: `${site.name}'s monitor stands at ${ownHeights} above ground, ${otherHeights.map((other) => `${other.name}'s at ${heightText(other.monitorHeightsM)}`).join(', ')}: seeing improves with height above ground, so part of the difference is the mast, not the site.`,
      });
    }
    // Set names carry commas ('Tokovinin 2002, Z-tilt'), so each row's sets go in parentheses, joined with '+'.
    const setsOf = (facts: ComparedSiteFacts) => [...new Set(facts.responseSets)].join(' + ');
    const ownSets = setsOf(site);
    const otherSets = sites.filter((other) => other !== site && setsOf(other) !== ownSets);
    if (otherSets.length > 0 && site.responseSets.length > 0) {
      warnings.push({
        code: 'different_response_sets',
        message: `${site.name}'s response coefficients (${ownSets}) differ from ${otherSets.map((other) => `${other.name}'s (${setsOf(other)})`).join(', ')}: the choice alone moves seeing by 7–10 %.`,
      });
    }
    if (nights < MINIMUM_NIGHTS_FOR_INTERVAL) {
      warnings.push({
        code: 'too_few_nights',
        message: `${site.name}: too few nights for an interval (${nights} ${nights === 1 ? 'night' : 'nights'}); at least ${MINIMUM_NIGHTS_FOR_INTERVAL} are needed, so no interval is shown.`,
      });
    }
    return warnings;
  });

  const pairs: ComparisonWarnings['pairs'] = [];
  for (let a = 0; a < sites.length; a += 1) {
    for (let b = a + 1; b < sites.length; b += 1) {
      const siteA = sites[a];
      const siteB = sites[b];
      if (!siteA || !siteB) continue;
      const monthsB = new Set((monthsOf[b] ?? []).map((entry) => entry.month));
      const shared = (monthsOf[a] ?? []).filter((entry) => monthsB.has(entry.month)).length;
      const warnings: ComparisonWarning[] = [];
      if (shared < MINIMUM_OVERLAP_MONTHS) {
        warnings.push({
          code: 'few_overlap_months',
          message: `${siteA.name} and ${siteB.name} share only ${shared} ${shared === 1 ? 'month' : 'months'} with nights at both (fewer than ${MINIMUM_OVERLAP_MONTHS}): their unpaired difference mixes seasons and weather; rely on the paired figures, or widen the window.`,
        });
      }
      pairs.push({ a, b, warnings });
    }
  }

  const general: ComparisonWarning[] = [];
  const changed: string[] = [];
  if (filters.maxZenithDeg !== DEFAULT_FILTERS.maxZenithDeg) changed.push(`zenith limit ${filters.maxZenithDeg}° instead of ${DEFAULT_FILTERS.maxZenithDeg}°`);
  if (filters.sunMaxDeg !== DEFAULT_FILTERS.sunMaxDeg) changed.push(`sun limit ${filters.sunMaxDeg}° instead of ${DEFAULT_FILTERS.sunMaxDeg}°`);
  if (filters.minFlux !== DEFAULT_FILTERS.minFlux) changed.push(`flux minimum ${String(filters.minFlux)} instead of ${DEFAULT_FILTERS.minFlux === null ? 'none' : String(DEFAULT_FILTERS.minFlux)}`);
  if (filters.leaveOutAnisotropic === false) changed.push('anisotropic samples kept instead of left out');
  if (changed.length > 0) {
    general.push({
      code: 'non_standard_filters',
      message: `The filters differ from the standard ones (${changed.join('; ')}): these figures are not comparable with figures made with the standard filters.`,
    });
  }
  return { sites: rowWarnings, pairs, general };
}

/** Nights per calendar month ('YYYY-MM'), in month order, from the nights' 'YYYY-MM-DD' labels. */
function nightsByMonth(site: ComparedSiteFacts): { month: string; nights: number }[] {
  const counts = new Map<string, number>();
  for (const label of site.nightLabels) {
    if (!/^\d{4}-\d{2}-\d{2}$/.test(label)) throw new SeeingInputError(`nightLabels must be 'YYYY-MM-DD' dates, got '${label}' for ${site.name}`);
    const month = label.slice(0, 7);
    counts.set(month, (counts.get(month) ?? 0) + 1);
  }
  return [...counts.entries()].sort(([left], [right]) => left.localeCompare(right)).map(([month, nights]) => ({ month, nights }));
}
