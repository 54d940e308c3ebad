import type { CampaignMonitor } from "@calmcrest/contracts";

/** Monitor settings a log's `#` comment block states (only those it states). */
export interface StatedMonitor {
  apertureMm?: number;
  baselineMm?: number;
  wavelengthNm?: number;
  pixelScaleArcsec?: number;
}

const NUMBER = String.raw`(\d+(?:[.,]\d+)?)`;
const toNumber = (text: string) => Number(text.replace(",", "."));

/** The `#` comment lines at the top of a log (before the header), without the `#`. */
export function leadingComments(text: string, maxLines = 60): string[] {
  const comments: string[] = [];
  for (const line of text.split(/\r\n|\n|\r/).slice(0, maxLines)) {
    const trimmed = line.trim();
    if (trimmed === "") continue;
    if (!trimmed.startsWith("#")) break;
    comments.push(trimmed.replace(/^#+\s*/, ""));
  }
  return comments;
}

/**
 * Reads the monitor settings a comment block states, as people write them: "aperture 60 mm, baseline 200 mm",
 * "D 60 mm, B 200 mm", "D=50mm", "550 nm", "0.65″/px", "0.65 arcsec/pixel". Two unlabelled lengths in mm are
 * read as aperture (the smaller) and baseline (the larger: the subapertures cannot overlap).
 */
export function statedMonitor(comments: readonly string[]): StatedMonitor {
  const block = comments.join("\n");
  const stated: StatedMonitor = {};
  const pixel = new RegExp(String.raw`${NUMBER}\s*(?:″|"|''|arc\s*sec(?:onds?)?|as)\s*(?:/|per)\s*(?:px|pix|pixels?)\b`, "i").exec(block);
  if (pixel?.[1]) stated.pixelScaleArcsec = toNumber(pixel[1]);
  const wavelength = new RegExp(String.raw`${NUMBER}\s*nm\b`, "i").exec(block);
  if (wavelength?.[1]) stated.wavelengthNm = toNumber(wavelength[1]);
  const aperture = new RegExp(String.raw`(?:aperture|diameter|\bD)\s*[:=]?\s*${NUMBER}\s*mm\b`, "i").exec(block);
  const baseline = new RegExp(String.raw`(?:baseline|separation|\bB)\s*[:=]?\s*${NUMBER}\s*mm\b`, "i").exec(block);
  if (aperture?.[1]) stated.apertureMm = toNumber(aperture[1]);
  if (baseline?.[1]) stated.baselineMm = toNumber(baseline[1]);
  if (stated.apertureMm === undefined && stated.baselineMm === undefined) {
    const lengths = [...block.matchAll(new RegExp(String.raw`${NUMBER}\s*mm\b`, "gi"))].map((match) => toNumber(match[1] ?? ""));
    if (lengths.length === 2) {
      stated.apertureMm = Math.min(...lengths);
      stated.baselineMm = Math.max(...lengths);
    }
  }
  return stated;
}

/** Sentences naming each stated setting that differs from the campaign's monitor; [] when they agree or none is stated. */
export function monitorDisagreements(stated: StatedMonitor, monitor: Pick<CampaignMonitor, "apertureMm" | "baselineMm" | "wavelengthNm" | "pixelScaleArcsec">): string[] {
  const differs = (a: number, b: number | null) => b === null || Math.abs(a - b) > 1e-6 * Math.max(1, Math.abs(a));
  const lines: string[] = [];
  if (stated.apertureMm !== undefined && differs(stated.apertureMm, monitor.apertureMm)) lines.push(`subaperture ${stated.apertureMm} mm (campaign: ${monitor.apertureMm} mm)`);
  if (stated.baselineMm !== undefined && differs(stated.baselineMm, monitor.baselineMm)) lines.push(`baseline ${stated.baselineMm} mm (campaign: ${monitor.baselineMm} mm)`);
  if (stated.wavelengthNm !== undefined && differs(stated.wavelengthNm, monitor.wavelengthNm)) lines.push(`wavelength ${stated.wavelengthNm} nm (campaign: ${monitor.wavelengthNm} nm)`);
  if (stated.pixelScaleArcsec !== undefined && differs(stated.pixelScaleArcsec, monitor.pixelScaleArcsec))
    lines.push(`pixel scale ${stated.pixelScaleArcsec}″/px (campaign: ${monitor.pixelScaleArcsec === null ? "none" : `${monitor.pixelScaleArcsec}″/px`})`);
  return lines;
}
