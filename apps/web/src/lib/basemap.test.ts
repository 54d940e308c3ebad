import { describe, expect, it } from "vitest";
import { countryOutlines, unwrapRing } from "./basemap";

describe("offline basemap", () => {
  it("keeps a ring that crosses the antimeridian in one piece", () => {
    const ring = [[179, 10], [-179, 10], [-179, 12], [179, 12], [179, 10]];
    expect(unwrapRing(ring)).toEqual([[179, 10], [181, 10], [181, 12], [179, 12], [179, 10]]);
  });

  it("leaves an ordinary ring alone", () => {
    const ring = [[-70, -25], [-68, -25], [-68, -27], [-70, -25]];
    expect(unwrapRing(ring)).toBe(ring);
  });

  it("ships the Natural Earth countries without Antarctica and without map-wide rings", () => {
    const outlines = countryOutlines();
    // world-atlas countries-110m has 177 features (STACK.md); one is Antarctica.
    expect(outlines.features).toHaveLength(176);
    for (const country of outlines.features) {
      const geometry = country.geometry;
      const polygons = geometry.type === "Polygon" ? [geometry.coordinates] : geometry.type === "MultiPolygon" ? geometry.coordinates : [];
      for (const ring of polygons.flat()) {
        const longitudes = ring.map((position) => position[0] ?? 0);
        expect(Math.max(...longitudes) - Math.min(...longitudes)).toBeLessThanOrEqual(180);
      }
    }
  });
});
