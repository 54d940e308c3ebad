import { describe, expect, it } from "vitest";
import { contrastRatio, relativeLuminance, seeingColour, seeingScalePosition } from "./colour-scale";

describe("seeing colour scale", () => {
  it("gets steadily lighter from sharp to blurred seeing, so the order survives colour blindness and greyscale", () => {
    let previous = -1;
    for (let seeingArcsec = 0.4; seeingArcsec <= 1.4; seeingArcsec += 0.05) {
      const luminance = relativeLuminance(seeingColour(seeingArcsec));
      expect(luminance).toBeGreaterThan(previous);
      previous = luminance;
    }
  });

  it("separates the two ends clearly", () => {
    // WCAG 2.1 relative-luminance contrast; 4.5:1 is the common-practice threshold for text.
    expect(contrastRatio(seeingColour(0.4), seeingColour(1.4))).toBeGreaterThan(4.5);
  });

  it("clamps values beyond the ends of the legend to the end colours", () => {
    expect(seeingColour(0.1)).toBe(seeingColour(0.4));
    expect(seeingColour(3)).toBe(seeingColour(1.4));
    expect(seeingScalePosition(0.9)).toBeCloseTo(0.5, 12);
  });

  it("gives the defined stop colours at the ends", () => {
    expect(seeingColour(0.4)).toBe("#162660");
    expect(seeingColour(1.4)).toBe("#f6d854");
  });

  it("computes WCAG contrast like the published black-on-white value of 21:1", () => {
    // WCAG 2.1 definition: white vs black is exactly 21:1.
    expect(contrastRatio("#ffffff", "#000000")).toBeCloseTo(21, 10);
  });

  it("refuses a value that is not a number", () => {
    expect(() => seeingColour(Number.NaN)).toThrow(/seeingArcsec/);
  });
});
