import { describe, expect, it } from "vitest";
import type { SiteListItem } from "@calmcrest/contracts";
import { markerLabel } from "./site-map";

// Invented site for the test.
const site: SiteListItem = { id: 4, name: "Flint Col", latitude: -24.1, longitude: -68.9, elevationM: 4210, notes: "", campaignCount: 1, campaignCountAtSite: 1, summary: null };

describe("site marker accessible name", () => {
  it("names the site with its median in arcsec and its nights, as the tooltip does", () => {
    expect(markerLabel({ ...site, summary: { samples: 51_000, nights: 1285, median: 0.7249, p25: 0.6, p75: 0.9 } })).toBe("Flint Col, median 0.72″, 1,285 nights");
  });

  it("says a site without samples has no data yet", () => {
    expect(markerLabel(site)).toBe("Flint Col, no data yet");
  });
});
