import { describe, expect, it } from "vitest";
import { filtersFromParams, paramsWithFilters, summaryQueryString } from "./filter-params";

describe("filter params in the page address", () => {
  it("reads a full set of filters as typed values", () => {
    const { filters, problems } = filtersFromParams(new URLSearchParams("from=2026-03-01&to=2026-04-30&maxZenithDeg=45&sunMaxDeg=-12&minFlux=800"));
    expect(filters).toEqual({ from: "2026-03-01", to: "2026-04-30", maxZenithDeg: 45, sunMaxDeg: -12, minFlux: 800 });
    expect(problems).toEqual([]);
  });

  it("drops only the bad value of a mistyped link and says which", () => {
    const { filters, problems } = filtersFromParams(new URLSearchParams("from=2026-03-01&maxZenithDeg=120&minFlux=abc"));
    expect(filters).toEqual({ from: "2026-03-01" });
    expect(problems).toHaveLength(2);
    expect(problems[0]).toContain("maxZenithDeg");
    expect(problems[1]).toContain("minFlux");
  });

  it("ignores a date window that ends before it starts", () => {
    const { filters, problems } = filtersFromParams(new URLSearchParams("from=2026-05-01&to=2026-04-01"));
    expect(filters).toEqual({});
    expect(problems[0]).toContain("ends");
  });

  it("keeps unrelated params such as the chosen night when filters change", () => {
    const next = paramsWithFilters(new URLSearchParams("night=2026-03-04&maxZenithDeg=50"), { from: "2026-03-01", maxZenithDeg: undefined });
    expect(next.get("night")).toBe("2026-03-04");
    expect(next.get("from")).toBe("2026-03-01");
    expect(next.has("maxZenithDeg")).toBe(false);
  });

  it("builds the same summary query string for the same filters in any order", () => {
    expect(summaryQueryString({ minFlux: 5, from: "2026-01-01" })).toBe("?from=2026-01-01&minFlux=5");
    expect(summaryQueryString({ sunMaxDeg: -12, from: "2026-01-01" })).toBe(summaryQueryString({ from: "2026-01-01", sunMaxDeg: -12 }));
    expect(summaryQueryString({})).toBe("");
  });

  it("round-trips filters through the address", () => {
    const filters = { from: "2026-02-01", to: "2026-02-28", maxZenithDeg: 30, sunMaxDeg: -15, minFlux: 100 };
    expect(filtersFromParams(paramsWithFilters(new URLSearchParams(), filters)).filters).toEqual(filters);
  });
});
