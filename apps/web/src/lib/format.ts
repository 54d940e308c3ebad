/** Display helpers: one place decides decimals and units so every screen writes numbers the same way. */

export const ARCSEC = "″";

export function formatArcsec(seeingArcsec: number | null | undefined, decimals = 2): string {
  return seeingArcsec === null || seeingArcsec === undefined || !Number.isFinite(seeingArcsec) ? "–" : `${seeingArcsec.toFixed(decimals)}${ARCSEC}`;
}

// One formatter per number of decimals, made once: `toLocaleString` with options builds a new one on every call,
// which showed in the profile of a site page (thousands of numbers in its tables and charts).
const numberFormats = new Map<number, Intl.NumberFormat>();

export function formatNumber(value: number | null | undefined, decimals = 0): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "–";
  let format = numberFormats.get(decimals);
  if (!format) {
    format = new Intl.NumberFormat("en-GB", { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
    numberFormats.set(decimals, format);
  }
  return format.format(value);
}

export function formatPercent(fraction: number | null | undefined, decimals = 0): string {
  return fraction === null || fraction === undefined || !Number.isFinite(fraction) ? "–" : `${(fraction * 100).toFixed(decimals)} %`;
}

/** Dates are shown in UTC (the logs are in UTC), as 2026-03-04 14:05 UTC. */
export function formatDateTimeUtc(iso: string | null | undefined): string {
  if (!iso) return "–";
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return `${date.toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

export function formatDateUtc(iso: string | null | undefined): string {
  if (!iso) return "–";
  const date = new Date(iso.length === 10 ? `${iso}T00:00:00Z` : iso);
  return Number.isNaN(date.getTime()) ? iso : date.toISOString().slice(0, 10);
}

export function formatBytes(sizeBytes: number): string {
  if (sizeBytes < 1024) return `${sizeBytes} B`;
  if (sizeBytes < 1024 * 1024) return `${(sizeBytes / 1024).toFixed(1)} kB`;
  return `${(sizeBytes / (1024 * 1024)).toFixed(1)} MB`;
}

const REASON_LABELS: Record<string, string> = {
  unterminated_quote: "quote not closed on its line",
  stray_quote: "misplaced quote",
  line_too_long: "line too long",
  wrong_field_count: "wrong number of columns",
  unreadable_time: "unreadable time",
  implausible_time: "time outside plausible years",
  missing_value: "missing value",
  non_decimal_number: "number not in decimal notation",
  non_physical: "impossible value",
  noise_dominated: "centroid noise too large",
  exposure_correction_too_large: "exposure correction too large",
  implausible_seeing: "seeing outside plausible range",
  duplicate_time: "duplicate time",
  zenith_limit: "beyond zenith limit",
  sun_above_limit: "sun too high",
  low_flux: "flux too low",
  anisotropic: "axes disagree (anisotropic)",
  excluded_window: "in an excluded window",
};

/** Plain words for a rejection reason code. */
export const reasonLabel = (reason: string) => REASON_LABELS[reason] ?? reason.replaceAll("_", " ");
