import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor, within } from "@testing-library/react";
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import type { CampaignDetail, SummaryResponse, UploadListItem } from "@calmcrest/contracts";
import { CampaignPage } from "./campaigns.$campaignId";

// Invented fixtures shaped by the contract types.
const upload = (id: number, status: UploadListItem["status"], fileName: string): UploadListItem => ({
  id,
  campaignId: 9,
  fileName,
  sizeBytes: 120_000,
  sha256: "ab".repeat(32),
  uploadedBy: { id: "u1", name: "Ada Field" },
  uploadedAt: `2026-02-0${id}T10:00:00Z`,
  mapping: {},
  status,
  samples: status === "done" ? { read: 100, accepted: 97, rejected: 3, rejectedByReason: { non_physical: 2, missing_value: 1 } } : { read: 0, accepted: 0, rejected: 0, rejectedByReason: {} },
  warnings: [],
  error: status === "failed" ? "Line 812: the disk filled up." : null,
  finishedAt: null,
  withdrawn: null,
  replacesUploadId: null,
  replacedByUploadId: null,
  monitorOverride: null,
  readOptions: { timeFormat: "iso", utcOffsetMinutes: 0 },
});
let uploads: UploadListItem[] = [];
const campaign = (): CampaignDetail => ({
  id: 9,
  siteId: 2,
  name: "Basalt mast",
  status: "running",
  startDate: "2026-01-01",
  endDate: null,
  monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, pixelScaleArcsec: null, exposureMs: null, heightAboveGroundM: 4, response: "z-tilt", responseName: "Tokovinin 2002, Z-tilt" },
  sampleCount: 97,
  uploadCount: uploads.length,
  firstSampleAt: null,
  lastSampleAt: null,
  siteName: "Basalt Rim",
  site: { id: 2, name: "Basalt Rim", latitude: -25, longitude: -68, elevationM: 4100 },
  notes: "",
  createdAt: "",
  updatedAt: "",
  uploads,
  exclusions: [],
  members: [],
  savedMapping: null,
  can: { upload: true, exclude: false, manageMembers: false, edit: false },
});
const emptySummary: SummaryResponse = {
  kind: "campaign",
  siteId: 2,
  siteName: "Basalt Rim",
  campaigns: [],
  filters: { from: null, to: null, maxZenithDeg: 60, sunMaxDeg: -18, minFlux: null, leaveOutAnisotropic: true },
  exclusions: [],
  samples: { read: 0, accepted: 0, rejected: 0, rejectedByReason: {} },
  includesIngestRejections: true,
  warnings: [],
  byCampaign: null,
  byHeight: null,
  empty: true,
};

const calls: string[] = [];
beforeEach(() => {
  calls.length = 0;
  uploads = [upload(1, "done", "trip-1.csv"), upload(2, "failed", "trip-2.csv")];
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string, init?: RequestInit) => {
      calls.push(`${init?.method ?? "GET"} ${url}`);
      if (url === "/api/uploads/2/retry") {
        uploads = [uploads[0] ?? upload(1, "done", "trip-1.csv"), upload(2, "queued", "trip-2.csv")];
        return new Response(JSON.stringify({ upload: { id: 2, status: "queued" } }), { status: 202 });
      }
      if (url === "/api/campaigns/9") return new Response(JSON.stringify(campaign()), { status: 200 });
      if (url.startsWith("/api/campaigns/9/summary")) return new Response(JSON.stringify(emptySummary), { status: 200 });
      return new Response(JSON.stringify({ error: { code: "not_found", message: "no fixture" } }), { status: 404 });
    }),
  );
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function renderPage() {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  queryClient.setQueryData(["campaigns", "detail", 9], campaign());
  const router = createMemoryRouter([{ path: "/campaigns/:campaignId", element: <CampaignPage /> }], { initialEntries: ["/campaigns/9"] });
  render(
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

describe("campaign page", () => {
  it("lists uploads newest first with counts by reason and a link to the rejected rows", () => {
    renderPage();
    const table = screen.getByRole("table", { name: "Uploads of this campaign" });
    const rows = within(table).getAllByRole("row").slice(1);
    expect(rows[0]?.textContent).toContain("trip-2.csv");
    expect(rows[1]?.textContent).toContain("2 impossible value");
    expect(within(rows[1] as HTMLElement).getByRole("link", { name: /rejected rows/ }).getAttribute("href")).toBe("/api/uploads/1/rejected.csv");
  });

  it("reads a failed upload again on request and shows it queued", async () => {
    renderPage();
    expect(screen.getByText(/disk filled up/)).toBeTruthy();
    fireEvent.click(screen.getByRole("button", { name: "Read it again" }));
    await waitFor(() => expect(calls).toContain("POST /api/uploads/2/retry"));
    await screen.findByText("queued");
    expect(screen.queryByRole("button", { name: "Read it again" })).toBeNull();
  });

  it("marks a done upload with warnings as such, shows each warning and labels the new reasons in plain words", () => {
    const warned = upload(1, "done", "trip-1.csv");
    warned.samples = { read: 40, accepted: 39, rejected: 1, rejectedByReason: { unterminated_quote: 1 } };
    warned.warnings = [{ code: "lines_not_split", message: "1 line could not be split into fields (unterminated_quote 1); the export is damaged there: see the rejected rows for the line numbers." }];
    uploads = [warned];
    renderPage();
    const table = screen.getByRole("table", { name: "Uploads of this campaign" });
    expect(within(table).getByText("done, with warnings")).toBeTruthy();
    expect(within(table).getByRole("note").textContent).toMatch(/^Warning: 1 line could not be split/);
    expect(within(table).getByText("1 quote not closed on its line")).toBeTruthy();
  });

  it("says what to do when nothing is uploaded yet", async () => {
    uploads = [];
    renderPage();
    expect(screen.getByText("No logs uploaded yet.")).toBeTruthy();
    await screen.findByText("No seeing data yet.");
  });
});
