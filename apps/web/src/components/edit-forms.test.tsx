import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { cleanup, fireEvent, render, screen, waitFor } from "@testing-library/react";
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import type { ReactNode } from "react";
import type { CampaignDetail, SiteDetail } from "@calmcrest/contracts";
import { EditCampaignForm, EditSiteForm } from "./edit-forms";

// Invented fixtures shaped by the contract types.
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, pixelScaleArcsec: null, exposureMs: null, heightAboveGroundM: 4, response: "z-tilt", responseName: "Tokovinin 2002, Z-tilt" } as const;
const campaignItem = { id: 9, siteId: 3, name: "Obsidian mast", status: "running", startDate: "2026-01-10", endDate: null, monitor, sampleCount: 0, uploadCount: 0, firstSampleAt: null, lastSampleAt: null } as const;
const site = (uploadCount = 0): SiteDetail => ({
  id: 3,
  name: "Obsidian Bench",
  latitude: -23.5,
  longitude: -67.75,
  elevationM: 4150,
  notes: "",
  campaignCount: 1, campaignCountAtSite: 1,
  summary: null,
  createdAt: "",
  updatedAt: "",
  campaigns: [{ ...campaignItem, uploadCount }],
});
const campaign = (uploadCount = 0): CampaignDetail => ({
  ...campaignItem,
  uploadCount,
  siteName: "Obsidian Bench",
  site: { id: 3, name: "Obsidian Bench", latitude: -23.5, longitude: -67.75, elevationM: 4150 },
  notes: "Mast on the north shoulder.",
  createdAt: "",
  updatedAt: "",
  uploads: [],
  exclusions: [],
  members: [],
  savedMapping: null,
  can: { upload: true, exclude: true, manageMembers: false, edit: true },
});

interface Sent {
  method: string;
  url: string;
  body: unknown;
}
let sent: Sent[] = [];
let answer: { status: number; body: unknown } = { status: 200, body: {} };

beforeEach(() => {
  sent = [];
  answer = { status: 200, body: {} };
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string, init?: RequestInit) => {
      sent.push({ method: init?.method ?? "GET", url, body: typeof init?.body === "string" ? JSON.parse(init.body) : undefined });
      return new Response(JSON.stringify(answer.body), { status: answer.status });
    }),
  );
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function renderWithQueries(node: ReactNode) {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  // Cached answers the forms must mark stale after saving.
  queryClient.setQueryData(["sites", "list"], []);
  queryClient.setQueryData(["sites", "detail", 3], site());
  queryClient.setQueryData(["campaigns", "detail", 9], campaign());
  render(<QueryClientProvider client={queryClient}>{node}</QueryClientProvider>);
  return queryClient;
}

const conflict = (code: string, message: string) => ({ status: 409, body: { error: { code, message } } });

describe("editing a site", () => {
  it("sends only the changed fields as a PATCH and refreshes the cached site list and detail", async () => {
    const queryClient = renderWithQueries(<EditSiteForm site={site()} />);
    fireEvent.change(screen.getByLabelText(/Elevation/), { target: { value: "4185" } });
    fireEvent.change(screen.getByLabelText("Notes"), { target: { value: "Road washed out in February." } });
    fireEvent.click(screen.getByRole("button", { name: "Save site" }));
    await screen.findByText("Changes saved.");
    expect(sent).toEqual([{ method: "PATCH", url: "/api/sites/3", body: { elevationM: 4185, notes: "Road washed out in February." } }]);
    expect(queryClient.getQueryState(["sites", "detail", 3])?.isInvalidated).toBe(true);
    expect(queryClient.getQueryState(["sites", "list"])?.isInvalidated).toBe(true);
  });

  it("shows the server's refusal to move a site that has uploads, in its own words", async () => {
    const message = "This site already has uploads, whose sun altitudes were computed from its current coordinates. Create a new site for the corrected position instead.";
    answer = conflict("site_has_samples", message);
    const queryClient = renderWithQueries(<EditSiteForm site={site(2)} />);
    expect(screen.getByText(/This site has uploads, so its position is fixed/)).toBeTruthy();
    fireEvent.change(screen.getByLabelText(/Latitude/), { target: { value: "-23.51" } });
    fireEvent.click(screen.getByRole("button", { name: "Save site" }));
    expect((await screen.findByRole("alert")).textContent).toBe(message);
    expect(sent).toEqual([{ method: "PATCH", url: "/api/sites/3", body: { latitude: -23.51 } }]);
    expect(queryClient.getQueryState(["sites", "detail", 3])?.isInvalidated).toBe(false);
  });

  it("checks the fields with the shared schema before sending anything", async () => {
    renderWithQueries(<EditSiteForm site={site()} />);
    fireEvent.change(screen.getByLabelText("Name"), { target: { value: "  " } });
    fireEvent.change(screen.getByLabelText(/Longitude/), { target: { value: "-190" } });
    fireEvent.click(screen.getByRole("button", { name: "Save site" }));
    await screen.findByText("Give the site a name.");
    expect(screen.getByText("longitude must be between -180 and 180 degrees.")).toBeTruthy();
    expect(sent).toEqual([]);
  });
});

describe("editing a campaign", () => {
  it("sends a new status and a cleared start date without the unchanged monitor, and refreshes the campaign and its site", async () => {
    const queryClient = renderWithQueries(<EditCampaignForm campaign={campaign()} />);
    fireEvent.change(screen.getByLabelText("Status"), { target: { value: "finished" } });
    fireEvent.change(screen.getByLabelText(/Start date/), { target: { value: "" } });
    fireEvent.click(screen.getByRole("button", { name: "Save campaign" }));
    await screen.findByText("Changes saved.");
    expect(sent).toEqual([{ method: "PATCH", url: "/api/campaigns/9", body: { status: "finished", startDate: null } }]);
    expect(queryClient.getQueryState(["campaigns", "detail", 9])?.isInvalidated).toBe(true);
    expect(queryClient.getQueryState(["sites", "detail", 3])?.isInvalidated).toBe(true);
  });

  it("says before Save that the monitor is locked once uploads exist, offering no editable monitor fields", () => {
    renderWithQueries(<EditCampaignForm campaign={campaign(3)} />);
    expect(screen.getByTestId("monitor-locked").textContent).toMatch(/^Locked: this campaign has uploads, and its samples were computed with these settings\./);
    expect(screen.queryByLabelText(/Height above ground/)).toBeNull();
    expect(screen.queryByLabelText(/Baseline/)).toBeNull();
  });

  it("sends the whole monitor when one setting of a campaign without uploads changes", async () => {
    renderWithQueries(<EditCampaignForm campaign={campaign()} />);
    fireEvent.change(screen.getByLabelText(/Height above ground/), { target: { value: "6.5" } });
    fireEvent.click(screen.getByRole("button", { name: "Save campaign" }));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]).toMatchObject({ method: "PATCH", url: "/api/campaigns/9", body: { monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, heightAboveGroundM: 6.5, response: "z-tilt" } } });
  });

  it("refuses a baseline shorter than the subaperture and sends nothing when nothing changed", async () => {
    renderWithQueries(<EditCampaignForm campaign={campaign()} />);
    fireEvent.click(screen.getByRole("button", { name: "Save campaign" }));
    await screen.findByText("Nothing was changed, so nothing was sent.");
    fireEvent.change(screen.getByLabelText(/Baseline/), { target: { value: "50" } });
    fireEvent.click(screen.getByRole("button", { name: "Save campaign" }));
    await screen.findByText(/baselineMm must be larger than apertureMm/);
    expect(sent).toEqual([]);
  });
});
