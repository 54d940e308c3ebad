import { afterEach, describe, expect, it } from "vitest";
import { cleanup, render, screen, within } from "@testing-library/react";
import { summarizeSeeing } from "@calmcrest/seeing-stats";
import type { SummaryResponse } from "@calmcrest/contracts";
import { BalancedFigures, GroupFigures, SummaryWarnings, TurbulenceFigures } from "./summary-details";

afterEach(cleanup);

/** Invented samples: 12 nights of 10 samples in May, τ0 5 ms everywhere, through the real engine. */
function statistics(withTurbulence: boolean) {
  const times: number[] = [];
  const seeing: number[] = [];
  for (let night = 0; night < 12; night += 1) {
    for (let sample = 0; sample < 10; sample += 1) {
      times.push(Date.UTC(2025, 4, 1 + night, 3, sample * 10));
      seeing.push(0.6 + 0.03 * sample + 0.01 * night);
    }
  }
  const summary = summarizeSeeing(
    {
      timeMs: Float64Array.from(times),
      seeingArcsec: Float64Array.from(seeing),
      ...(withTurbulence ? { tau0Ms: new Float64Array(times.length).fill(5) } : {}),
    },
    { longitudeDeg: -70, latitudeDeg: -27, context: { responseSets: ["Z-tilt", "G-tilt"] } },
  );
  if (summary === null) throw new Error("expected statistics");
  return summary;
}

const scope = {
  kind: "site" as const,
  siteId: 1,
  siteName: "Invented Ridge",
  campaigns: [],
  filters: { from: null, to: null, maxZenithDeg: 60, sunMaxDeg: -18, minFlux: null, leaveOutAnisotropic: true },
  exclusions: [],
  samples: { read: 120, accepted: 120, rejected: 0, rejectedByReason: {} },
  includesIngestRejections: true,
};

describe("the summary details", () => {
  it("list every warning in its sentence", () => {
    render(<SummaryWarnings warnings={statistics(false).warnings} />);
    const items = within(screen.getByTestId("summary-warnings")).getAllByRole("listitem");
    expect(items.map((item) => item.getAttribute("data-code"))).toEqual(["mixed_response_sets", "approximate_interval"]);
    expect(items[0]?.textContent).toMatch(/different response coefficient sets \(Z-tilt, G-tilt\)/);
  });

  it("show the season-balanced median, the nightly medians and the time below with its interval", () => {
    const summary = statistics(false);
    render(<BalancedFigures summary={{ ...scope, empty: false, byCampaign: null, byHeight: null, ...summary }} />);
    const figures = screen.getByTestId("balanced-figures");
    expect(figures.textContent).toContain(`${summary.seasonBalanced.medianArcsec.toFixed(2)}″`);
    expect(figures.textContent).toMatch(/no samples in January, February, March, June/);
    expect(figures.textContent).toMatch(/each of 12 nights counts once/);
    expect(figures.textContent).toMatch(/Time below 0\.8″/);
    expect(figures.textContent).toMatch(/95 % interval/);
  });

  it("show τ0 when the logs carry it, and nothing when they do not", () => {
    const { container } = render(<TurbulenceFigures summary={{ ...scope, empty: false, byCampaign: null, byHeight: null, ...statistics(false) }} />);
    expect(container.textContent).toBe("");
    cleanup();
    render(<TurbulenceFigures summary={{ ...scope, empty: false, byCampaign: null, byHeight: null, ...statistics(true) }} />);
    expect(screen.getByTestId("turbulence-figures").textContent).toMatch(/Coherence time τ0, median5\.00 ms/);
  });

  it("give the figures per campaign when the summary has them", () => {
    const group = { label: "Low mast (Tokovinin 2002, Z-tilt)", campaignIds: [1], samples: 90, nights: 4, median: 0.71, p25: 0.6, p75: 0.8, medianCi95: null, interval: { status: "too_few_nights" as const, nights: 4, reason: "too few nights for an interval (4 nights)" }, seasonBalancedMedian: 0.7 };
    const summary: SummaryResponse = { ...scope, empty: false, byCampaign: [group], byHeight: null, ...statistics(false) };
    render(<GroupFigures summary={summary} />);
    const table = within(screen.getByTestId("group-figures"));
    expect(table.getByText("Per campaign")).toBeTruthy();
    expect(table.getByText(/too few nights for an interval \(4 nights\)/)).toBeTruthy();
    expect(table.queryByText("Per monitor height")).toBeNull();
  });
});
