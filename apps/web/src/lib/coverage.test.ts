import { describe, expect, it } from "vitest";
import { coverageByMonth, coverageRange } from "./coverage";

describe("coverage by month", () => {
  it("counts observed nights per month and keeps empty months as gaps", () => {
    const months = coverageByMonth(["2026-01-30", "2026-01-31", "2026-03-02"]);
    expect(months).toEqual([
      { month: "2026-01", observedNights: 2, daysInMonth: 31 },
      { month: "2026-02", observedNights: 0, daysInMonth: 28 },
      { month: "2026-03", observedNights: 1, daysInMonth: 31 },
    ]);
  });

  it("runs across a year end and knows leap Februaries", () => {
    const months = coverageByMonth(["2027-12-05"], "2027-11", "2028-02");
    expect(months.map((month) => month.month)).toEqual(["2027-11", "2027-12", "2028-01", "2028-02"]);
    // 2028 is a leap year (divisible by 4, not a century).
    expect(months[3]?.daysInMonth).toBe(29);
  });

  it("is empty without nights or range", () => {
    expect(coverageByMonth([])).toEqual([]);
  });
});

describe("coverage range of a campaign card", () => {
  it("cuts the date window to the campaign's own data, so months before it started are not shown as gaps", () => {
    const campaign = { firstSampleAt: "2025-08-01T01:00:00Z", lastSampleAt: "2026-01-28T05:00:00Z" };
    expect(coverageRange(campaign, { from: "2025-06-01", to: "2025-09-30" })).toEqual({ fromMonth: "2025-08", toMonth: "2025-09" });
    expect(coverageRange(campaign, {})).toEqual({ fromMonth: "2025-08", toMonth: "2026-01" });
    // A window that misses the campaign gives an empty range (from after to), drawn as "no observed nights".
    expect(coverageByMonth([], ...Object.values(coverageRange(campaign, { from: "2025-01-01", to: "2025-03-31" })))).toEqual([]);
  });
});
