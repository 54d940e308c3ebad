/**
 * Calmcrest's seeing colour scale: one continuous ramp from deep blue (sharp images, small seeing) through grey to
 * straw yellow (blurred images, large seeing). Lightness rises steadily along the ramp, so the order reads the same
 * for the common forms of colour blindness and in greyscale print (the idea behind cividis-type ramps; these stops
 * are our own).
 */
export const SEEING_SCALE_MIN_ARCSEC = 0.4;
// Candidate sites mostly fall between 0.5″ and 1.2″; a range much wider than that would wash out their differences.
export const SEEING_SCALE_MAX_ARCSEC = 1.4;

const STOPS: readonly { at: number; rgb: readonly [number, number, number] }[] = [
  { at: 0, rgb: [22, 38, 96] },
  { at: 0.25, rgb: [58, 78, 138] },
  { at: 0.5, rgb: [118, 121, 122] },
  { at: 0.75, rgb: [181, 165, 96] },
  { at: 1, rgb: [246, 216, 84] },
];

const hex = (value: number) => Math.round(value).toString(16).padStart(2, "0");

/** Position 0..1 of a seeing value on the scale (clamped: values beyond the ends take the end colour). */
export function seeingScalePosition(seeingArcsec: number): number {
  const position = (seeingArcsec - SEEING_SCALE_MIN_ARCSEC) / (SEEING_SCALE_MAX_ARCSEC - SEEING_SCALE_MIN_ARCSEC);
  return Math.min(1, Math.max(0, position));
}

/** CSS colour `#rrggbb` for a seeing value in arcseconds. */
export function seeingColour(seeingArcsec: number): string {
  if (!Number.isFinite(seeingArcsec)) throw new RangeError(`seeingArcsec must be a finite number of arcseconds, got ${seeingArcsec}`);
  const position = seeingScalePosition(seeingArcsec);
  for (let index = 1; index < STOPS.length; index += 1) {
    const upper = STOPS[index];
    const lower = STOPS[index - 1];
    if (!upper || !lower || position > upper.at) continue;
    const weight = (position - lower.at) / (upper.at - lower.at);
    const [r, g, b] = lower.rgb.map((channel, channelIndex) => channel + ((upper.rgb[channelIndex] ?? channel) - channel) * weight) as [number, number, number];
    return `#${hex(r)}${hex(g)}${hex(b)}`;
  }
  const last = STOPS[STOPS.length - 1];
  return last ? `#${last.rgb.map(hex).join("")}` : "#000000";
}

/** WCAG relative luminance of a `#rrggbb` colour (used to pick legible label colours and in the scale's tests). */
export function relativeLuminance(colour: string): number {
  const channels = [1, 3, 5].map((start) => Number.parseInt(colour.slice(start, start + 2), 16) / 255);
  const [r, g, b] = channels.map((c) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4)) as [number, number, number];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG contrast ratio between two `#rrggbb` colours. */
export function contrastRatio(first: string, second: string): number {
  const [light, dark] = [relativeLuminance(first), relativeLuminance(second)].sort((a, b) => b - a) as [number, number];
  return (light + 0.05) / (dark + 0.05);
}

/** Tick values for the legend, in arcseconds. */
export const SEEING_LEGEND_TICKS_ARCSEC = [0.4, 0.6, 0.8, 1.0, 1.2, 1.4] as const;
