import { describe, expect, it } from "vitest";
import { leadingComments, monitorDisagreements, statedMonitor } from "./comment-monitor";

const campaign = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, pixelScaleArcsec: null };

describe("monitor settings stated in a log's comments", () => {
  it("reads unlabelled lengths as aperture and baseline, and names every setting that differs from the campaign's", () => {
    const stated = statedMonitor(leadingComments("# monitor 50 mm, 180 mm, 550 nm, 0.65″/px\ntime_utc,seeing_arcsec\n# later comment 99 mm\n"));
    expect(stated).toEqual({ apertureMm: 50, baselineMm: 180, wavelengthNm: 550, pixelScaleArcsec: 0.65 });
    expect(monitorDisagreements(stated, campaign)).toEqual([
      "subaperture 50 mm (campaign: 60 mm)",
      "baseline 180 mm (campaign: 200 mm)",
      "wavelength 550 nm (campaign: 500 nm)",
      "pixel scale 0.65″/px (campaign: none)",
    ]);
  });

  it("reads labelled settings and finds nothing to say when they agree", () => {
    expect(statedMonitor(["monitor: aperture 60 mm, baseline 200 mm, wavelength 500 nm"])).toEqual({ apertureMm: 60, baselineMm: 200, wavelengthNm: 500 });
    expect(statedMonitor(["DIMM on the north ridge; D 60 mm, B 200 mm, 500 nm"])).toEqual({ apertureMm: 60, baselineMm: 200, wavelengthNm: 500 });
    expect(monitorDisagreements(statedMonitor(["D=60mm B=200mm 500 nm"]), campaign)).toEqual([]);
  });

  it("states nothing for a comment block without settings", () => {
    expect(statedMonitor(leadingComments("# Invented DIMM log (seed 11)\ntime_utc\n"))).toEqual({});
  });
});
