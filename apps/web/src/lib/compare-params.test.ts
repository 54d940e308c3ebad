import { describe, expect, it } from "vitest";
import { comparisonQueryString, paramsWithSelection, selectionFromParams } from "./compare-params";

describe("the comparison in the page address", () => {
  it("reads sites, the telescope and the pairing, with the defaults for what is missing", () => {
    expect(selectionFromParams(new URLSearchParams("sites=3,1,3,x&apertureM=4.1&pairing=bins"))).toEqual({
      kind: "sites",
      ids: [3, 1],
      apertureM: 4.1,
      bandNm: 500,
      outerScaleM: 25,
      pairing: "bins",
    });
    expect(selectionFromParams(new URLSearchParams("campaigns=5,7&outerScaleM=-2")).kind).toBe("campaigns");
    expect(selectionFromParams(new URLSearchParams("campaigns=5,7&outerScaleM=-2")).outerScaleM).toBe(25);
    expect(selectionFromParams(new URLSearchParams("sites=1,2,3,4,5,6,7,8")).ids).toHaveLength(6);
  });
  it("writes only what differs from the defaults and keeps the filters and other parameters", () => {
    const params = paramsWithSelection(new URLSearchParams("from=2025-03-01&sites=9"), { kind: "campaigns", ids: [4, 2], apertureM: null, bandNm: 500, outerScaleM: 30, pairing: "nights" });
    expect(params.toString()).toBe("from=2025-03-01&campaigns=4%2C2&outerScaleM=30");
    expect(comparisonQueryString({ kind: "sites", ids: [1, 2], apertureM: 8, bandNm: 2200, outerScaleM: 25, pairing: "bins" }, { to: "2025-06-30", maxZenithDeg: 45 })).toBe(
      "sites=1%2C2&apertureM=8&bandNm=2200&pairing=bins&to=2025-06-30&maxZenithDeg=45",
    );
  });
});
