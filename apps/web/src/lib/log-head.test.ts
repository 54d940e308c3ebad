import { describe, expect, it } from "vitest";
import { mappingFitsHeaders, readLogHead, unitsOfMapping, withUnits } from "./log-head";

const foreignLog = [
  "# exported by the monitor PC",
  "Timestamp (UTC);FWHM [arcsec];Airmass;Counts",
  "2026-03-01 23:00:00;0.81;1.12;5400",
  "2026-03-01 23:01:00;0.77;1.12;5380",
  "2026-03-01 23:02",
].join("\n");

describe("reading a log's first rows in the browser", () => {
  it("finds the semicolon delimiter and the headers after a comment line", () => {
    const head = readLogHead(foreignLog);
    expect(head.delimiter).toBe(";");
    expect(head.headers).toEqual(["Timestamp (UTC)", "FWHM [arcsec]", "Airmass", "Counts"]);
  });

  it("drops the cut-off last line of the slice", () => {
    const head = readLogHead(foreignLog);
    expect(head.rows).toHaveLength(2);
    expect(head.rows[1]?.["FWHM [arcsec]"]).toBe("0.77");
  });

  it("proposes a mapping from non-native header names", () => {
    expect(readLogHead(foreignLog).proposedMapping).toMatchObject({ time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM [arcsec]", airmass: "Airmass" });
  });

  it("says what is wrong with a file of comments only", () => {
    expect(() => readLogHead("# nothing here\n\n")).toThrow(/header line/);
  });
});

describe("units of a mapping", () => {
  it("moves the variance columns to the pixel² fields and back", () => {
    const arcsec = { time_utc: "t", var_long_arcsec2: "vl", var_trans_arcsec2: "vt", zenith_deg: "z" };
    const pixel = withUnits(arcsec, { variance: "px2", pointing: "zenith" });
    expect(pixel).toEqual({ time_utc: "t", var_long_px2: "vl", var_trans_px2: "vt", zenith_deg: "z" });
    expect(unitsOfMapping(pixel).variance).toBe("px2");
    expect(withUnits(pixel, { variance: "arcsec2", pointing: "zenith" })).toEqual(arcsec);
  });

  it("reads the pointing column as airmass instead of zenith angle", () => {
    const next = withUnits({ time_utc: "t", seeing_arcsec: "s", zenith_deg: "Z" }, { variance: "arcsec2", pointing: "airmass" });
    expect(next).toEqual({ time_utc: "t", seeing_arcsec: "s", airmass: "Z" });
    expect(unitsOfMapping(next).pointing).toBe("airmass");
  });

  it("offers a saved mapping only when the file has all of its columns", () => {
    expect(mappingFitsHeaders({ time_utc: "A", seeing_arcsec: "B" }, ["A", "B", "C"])).toBe(true);
    expect(mappingFitsHeaders({ time_utc: "A", seeing_arcsec: "X" }, ["A", "B"])).toBe(false);
  });
});
