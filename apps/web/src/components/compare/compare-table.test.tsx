import { afterEach, describe, expect, it } from "vitest";
import { cleanup, render, screen, within } from "@testing-library/react";
import type { ComparisonResponse } from "@calmcrest/contracts";
import fixture from "../../lib/comparison.fixture.json";
import { ComparisonTable } from "./compare-table";

// A real answer of GET /api/comparisons: Quartz Shoulder and Tern Ridge, March to May 2025.
const comparison = fixture as unknown as ComparisonResponse;

afterEach(cleanup);

const rowOf = (name: string) => screen.getByRole("rowheader", { name: new RegExp(name) }).closest("tr") as HTMLElement;

describe("ComparisonTable", () => {
  it("marks the best value of a column with a star, bold text and words, not colour alone", () => {
    render(<ComparisonTable comparison={comparison} />);
    const [quartz, tern] = comparison.rows;
    const sharper = (quartz?.statistics?.seeing.median ?? 0) < (tern?.statistics?.seeing.median ?? 0) ? "Quartz Shoulder" : "Tern Ridge";
    const other = sharper === "Quartz Shoulder" ? "Tern Ridge" : "Quartz Shoulder";
    const bestCell = within(rowOf(sharper)).getByText("best (lowest median seeing):").closest("td");
    expect(bestCell?.className).toContain("font-bold");
    expect(bestCell?.textContent).toMatch(/^★best \(lowest median seeing\): \d\.\d\d″/);
    expect(within(rowOf(other)).queryByText("best (lowest median seeing):")).toBeNull();
  });
  it("marks no best where the rows tie or where no column value can be better (heights, response sets)", () => {
    const tied = {
      ...comparison,
      rows: comparison.rows.map((row) => (row.statistics ? { ...row, statistics: { ...row.statistics, nights: 40 } } : row)),
    };
    render(<ComparisonTable comparison={tied} />);
    expect(screen.queryAllByText("best (most nights):")).toHaveLength(0);
    expect(screen.queryAllByText(/best \(.*(height|response)/)).toHaveLength(0);
  });
  it("lists each row's warnings in words under it", () => {
    render(<ComparisonTable comparison={comparison} />);
    for (const row of comparison.rows) {
      expect(row.warnings.length).toBeGreaterThan(0);
      const list = screen.getByRole("list", { name: `Warnings for ${row.label}` });
      expect(within(list).getAllByRole("listitem").map((item) => item.textContent?.replace(/^⚠/, ""))).toEqual(row.warnings.map((warning) => warning.message));
    }
  });
});
