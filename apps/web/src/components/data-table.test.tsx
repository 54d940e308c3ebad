import { afterEach, describe, expect, it } from "vitest";
import { cleanup, fireEvent, render, screen, within } from "@testing-library/react";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable } from "./data-table";

interface Row {
  name: string;
  medianArcsec: number | null;
}
const helper = createColumnHelper<Row>();
const columns = [
  helper.accessor("name", { header: "Site" }),
  helper.accessor((row) => row.medianArcsec ?? undefined, {
    id: "medianArcsec", header: "Median seeing", meta: { unit: "arcsec", numeric: true }, cell: (c) => c.getValue()?.toFixed(2) ?? "–",
  }),
];
const rows: Row[] = [
  { name: "Bravo", medianArcsec: 0.9 },
  { name: "Alpha", medianArcsec: null },
  { name: "Charlie", medianArcsec: 0.61 },
];

const bodyNames = () => within(screen.getAllByRole("rowgroup")[1] as HTMLElement).getAllByRole("row").map((row) => row.querySelector("td")?.textContent);

afterEach(cleanup);

describe("DataTable", () => {
  it("sorts by a column when its header is clicked, and reverses on the second click", () => {
    render(<DataTable caption="Sites" columns={columns} data={rows} />);
    const header = screen.getByRole("button", { name: /Median seeing/ });
    fireEvent.click(header);
    expect(bodyNames()).toEqual(["Charlie", "Bravo", "Alpha"]);
    expect(screen.getByRole("columnheader", { name: /Median seeing/ }).getAttribute("aria-sort")).toBe("ascending");
    fireEvent.click(header);
    // Sites without a value stay at the end in both directions.
    expect(bodyNames()).toEqual(["Bravo", "Charlie", "Alpha"]);
  });

  it("writes the unit in the header and right-aligns numbers", () => {
    render(<DataTable caption="Sites" columns={columns} data={rows} />);
    expect(screen.getByRole("columnheader", { name: /Median seeing/ }).textContent).toContain("arcsec");
    expect(screen.getByText("0.61").className).toContain("num");
  });

  it("splits many rows into pages", () => {
    const many = Array.from({ length: 12 }, (_, index) => ({ name: `Site ${index + 1}`, medianArcsec: index / 10 }));
    render(<DataTable caption="Sites" columns={columns} data={many} pageSize={5} />);
    expect(bodyNames()).toHaveLength(5);
    expect(screen.getByText("Page 1 of 3")).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Next" }));
    expect(bodyNames()[0]).toBe("Site 6");
  });

  it("shows the empty message when there are no rows", () => {
    render(<DataTable caption="Sites" columns={columns} data={[]} empty={<p>No sites yet</p>} />);
    expect(screen.getByText("No sites yet")).toBeTruthy();
  });
});
