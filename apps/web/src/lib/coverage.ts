/** One calendar month of a campaign's coverage: how many nights have at least one accepted sample. */
export interface CoverageMonth {
  month: string; // YYYY-MM
  observedNights: number;
  daysInMonth: number;
}

const daysIn = (year: number, monthIndex: number) => new Date(Date.UTC(year, monthIndex + 1, 0)).getUTCDate();

/**
 * Observed nights per month from the list of nights with data (labels 'YYYY-MM-DD'), covering every month from
 * `fromMonth` (or the first night) to `toMonth` (or the last night), so months without any data show as gaps.
 */
export function coverageByMonth(nights: readonly string[], fromMonth?: string, toMonth?: string): CoverageMonth[] {
  const months = nights.map((night) => night.slice(0, 7)).sort();
  const first = fromMonth ?? months[0];
  const last = toMonth ?? months[months.length - 1];
  if (!first || !last || first > last) return [];
  const counts = new Map<string, number>();
  for (const month of months) counts.set(month, (counts.get(month) ?? 0) + 1);
  const result: CoverageMonth[] = [];
  let year = Number(first.slice(0, 4));
  let monthIndex = Number(first.slice(5, 7)) - 1;
  // A ten-year cap keeps a malformed range from looping for ever.
  for (let step = 0; step < 120; step += 1) {
    const label = `${year}-${String(monthIndex + 1).padStart(2, "0")}`;
    if (label > last) break;
    result.push({ month: label, observedNights: counts.get(label) ?? 0, daysInMonth: daysIn(year, monthIndex) });
    monthIndex += 1;
    if (monthIndex === 12) {
      monthIndex = 0;
      year += 1;
    }
  }
  return result;
}

/** Months to draw: the campaign's own data span, cut to the date window (months outside its span are not gaps). */
export function coverageRange(campaign: { firstSampleAt: string | null; lastSampleAt: string | null }, filters: { from?: string; to?: string }): { fromMonth?: string; toMonth?: string } {
  const first = campaign.firstSampleAt?.slice(0, 7);
  const last = campaign.lastSampleAt?.slice(0, 7);
  const windowFrom = filters.from?.slice(0, 7);
  const windowTo = filters.to?.slice(0, 7);
  const fromMonth = first && windowFrom ? (first > windowFrom ? first : windowFrom) : (first ?? windowFrom);
  const toMonth = last && windowTo ? (last < windowTo ? last : windowTo) : (last ?? windowTo);
  return { ...(fromMonth ? { fromMonth } : {}), ...(toMonth ? { toMonth } : {}) };
}
