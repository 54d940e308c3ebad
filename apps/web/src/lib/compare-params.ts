import { COMPARISON_MAX_ITEMS, DEFAULT_BAND_NM, DEFAULT_OUTER_SCALE_M, type SummaryQuery } from "@calmcrest/contracts";
import { paramsWithFilters } from "./filter-params";

/** What is compared and the planned telescope, as they appear in the page address (besides the shared filters). */
export interface CompareSelection {
  kind: "sites" | "campaigns";
  ids: number[];
  /** Planned telescope: aperture (m; none = a telescope much larger than L0/300), band (nm), outer scale L0 (m). */
  apertureM: number | null;
  bandNm: number;
  outerScaleM: number;
  pairing: "nights" | "bins";
}

export const COMPARE_PARAM_NAMES = ["sites", "campaigns", "apertureM", "bandNm", "outerScaleM", "pairing"] as const;

const idsOf = (text: string | null): number[] =>
  [...new Set((text ?? "").split(",").map((part) => Number(part.trim())).filter((id) => Number.isSafeInteger(id) && id > 0))].slice(0, COMPARISON_MAX_ITEMS);

const positive = (text: string | null): number | null => {
  if (text === null || text.trim() === "") return null;
  const value = Number(text);
  return Number.isFinite(value) && value > 0 ? value : null;
};

/** Reads the selection from the address; anything unreadable falls back to the defaults (the server checks again). */
export function selectionFromParams(params: URLSearchParams): CompareSelection {
  const campaigns = idsOf(params.get("campaigns"));
  const kind = campaigns.length > 0 && params.get("sites") === null ? "campaigns" : "sites";
  return {
    kind,
    ids: kind === "campaigns" ? campaigns : idsOf(params.get("sites")),
    apertureM: positive(params.get("apertureM")),
    bandNm: positive(params.get("bandNm")) ?? DEFAULT_BAND_NM,
    outerScaleM: positive(params.get("outerScaleM")) ?? DEFAULT_OUTER_SCALE_M,
    pairing: params.get("pairing") === "bins" ? "bins" : "nights",
  };
}

/** Writes the selection into a copy of `params` (defaults are left out, so the address stays short). */
export function paramsWithSelection(params: URLSearchParams, selection: CompareSelection): URLSearchParams {
  const next = new URLSearchParams(params);
  for (const name of COMPARE_PARAM_NAMES) next.delete(name);
  if (selection.ids.length > 0) next.set(selection.kind, selection.ids.join(","));
  if (selection.apertureM !== null) next.set("apertureM", String(selection.apertureM));
  if (selection.bandNm !== DEFAULT_BAND_NM) next.set("bandNm", String(selection.bandNm));
  if (selection.outerScaleM !== DEFAULT_OUTER_SCALE_M) next.set("outerScaleM", String(selection.outerScaleM));
  if (selection.pairing !== "nights") next.set("pairing", selection.pairing);
  return next;
}

/** The `GET /api/comparisons` query string for a selection and the shared filters, in a fixed order. */
export function comparisonQueryString(selection: CompareSelection, filters: SummaryQuery): string {
  return paramsWithFilters(paramsWithSelection(new URLSearchParams(), selection), filters).toString();
}
