import { describe, expect, it } from "vitest";
import { comparisonQuerySchema } from "./comparisons";

const issuesOf = (query: Record<string, string>) => {
  const parsed = comparisonQuerySchema.safeParse(query);
  return parsed.success ? [] : parsed.error.issues.map((issue) => `${issue.path.join(".")}: ${issue.message}`);
};

describe("comparisonQuerySchema", () => {
  it("reads a list of sites with the defaults for the telescope and the pairing", () => {
    expect(comparisonQuerySchema.parse({ sites: "1,3,4" })).toEqual({ sites: [1, 3, 4], bandNm: 500, outerScaleM: 25, pairing: "nights" });
    expect(comparisonQuerySchema.parse({ campaigns: " 5 , 7", apertureM: "4.1", bandNm: "2200", outerScaleM: "30", pairing: "bins", from: "2025-03-01", to: "2025-06-30" })).toEqual({
      campaigns: [5, 7],
      apertureM: 4.1,
      bandNm: 2200,
      outerScaleM: 30,
      pairing: "bins",
      from: "2025-03-01",
      to: "2025-06-30",
    });
  });
  it("names the parameter for one site, seven sites, a repeated or malformed id and neither list", () => {
    expect(issuesOf({ sites: "1" })).toEqual(["sites: sites must list 2 to 6 sites to compare; got 1."]);
    expect(issuesOf({ sites: "1,2,3,4,5,6,7" })).toEqual(["sites: sites must list 2 to 6 sites to compare; got 7."]);
    expect(issuesOf({ campaigns: "2,2" })).toEqual(['campaigns: campaigns names the same id twice ("2,2"); list each campaign once.']);
    expect(issuesOf({ sites: "1,x" })[0]).toMatch(/^sites: sites must be a comma-separated list of ids/);
    expect(issuesOf({})).toEqual(["sites: Give either sites=… or campaigns=… (2 to 6 ids), not both and not neither."]);
    expect(issuesOf({ sites: "1,2", campaigns: "3,4" })[0]).toMatch(/^sites: Give either/);
  });
  it("refuses from after to, naming to, and telescope settings that are not positive", () => {
    expect(issuesOf({ sites: "1,2", from: "2025-06-02", to: "2025-06-01" })).toEqual(["to: to must not be before from: the window must end on or after its first day."]);
    expect(issuesOf({ sites: "1,2", apertureM: "-4" })).toEqual(["apertureM: apertureM must be a positive number of metres, at most 100."]);
    expect(issuesOf({ sites: "1,2", outerScaleM: "zero" })[0]).toMatch(/^outerScaleM: outerScaleM must be/);
    expect(issuesOf({ sites: "1,2", pairing: "hours" })).toEqual(["pairing: pairing must be nights or bins."]);
  });
});
