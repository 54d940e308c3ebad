import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { act, cleanup, fireEvent, render, screen, waitFor } from "@testing-library/react";
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { createMemoryRouter, RouterProvider } from "react-router-dom";
import type { CampaignDetail, SiteDetail, SiteListItem, UploadPreview, WholeFileCheck } from "@calmcrest/contracts";
import { UploadPage } from "./upload";

// Invented fixtures shaped by the contract types: one site with one campaign that has a saved mapping.
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, pixelScaleArcsec: null, exposureMs: null, heightAboveGroundM: 3, response: "z-tilt", responseName: "Tokovinin 2002, Z-tilt" } as const;
const campaignItem = { id: 7, siteId: 3, name: "Test mast", status: "running", startDate: null, endDate: null, monitor, sampleCount: 0, uploadCount: 0, firstSampleAt: null, lastSampleAt: null } as const;
const site: SiteListItem = { id: 3, name: "Pumice Knoll", latitude: -24, longitude: -67, elevationM: 4000, notes: "", campaignCount: 1, campaignCountAtSite: 1, summary: null };
const siteDetail: SiteDetail = { ...site, createdAt: "", updatedAt: "", campaigns: [campaignItem] };
let savedMapping: CampaignDetail["savedMapping"] = null;
const campaign = (): CampaignDetail => ({
  ...campaignItem,
  siteName: site.name,
  site: { id: 3, name: site.name, latitude: -24, longitude: -67, elevationM: 4000 },
  notes: "",
  createdAt: "",
  updatedAt: "",
  uploads: [],
  exclusions: [],
  members: [],
  savedMapping,
  can: { upload: true, exclude: true, manageMembers: false, edit: false },
});
const preview: UploadPreview = { delimiter: ";", headers: [], proposedMapping: {}, mappingProblems: [], mappingUsed: {}, rows: [] };

/** The server's whole-file check of the test file (one good row), changed by the tests that need another answer. */
const goodCheck = (): WholeFileCheck => ({
  fileName: "trip.csv",
  sizeBytes: 80,
  delimiter: ";",
  preambleLines: 0,
  headers: ["Timestamp (UTC)", "FWHM [arcsec]", "Airmass", "Notes"],
  mapping: {},
  rowsRead: 1,
  usable: 1,
  rejected: 0,
  rejectedByReason: {},
  problemLines: [],
  setAsideByStandardFilters: { zenith_limit: 0, sun_above_limit: 0, maxZenithDeg: 60, sunMaxDeg: -18 },
  warnings: [],
  sameFile: null,
  sha256: "ab".repeat(32),
  durationMs: 3,
});
let checkAnswer: () => WholeFileCheck = goodCheck;

const answers: Record<string, () => unknown> = {
  "/api/sites": () => [site],
  "/api/sites/3": () => siteDetail,
  "/api/campaigns": () => [{ ...campaignItem, siteName: site.name }],
  "/api/campaigns/7": campaign,
  "/api/campaigns/7/uploads/preview": () => preview,
  "/api/campaigns/7/saved-mapping": () => ({}),
};

/** Stands in for the browser's XMLHttpRequest (the upload uses it for its progress events); the test drives it. */
class FakeUploadRequest {
  static sent: FakeUploadRequest[] = [];
  upload: { onprogress: ((event: { lengthComputable: boolean; loaded: number; total: number }) => void) | null } = { onprogress: null };
  onabort: (() => void) | null = null;
  onerror: (() => void) | null = null;
  onload: (() => void) | null = null;
  withCredentials = false;
  url = "";
  aborted = false;
  status = 0;
  responseText = "";
  open(_method: string, url: string) {
    this.url = url;
  }
  setRequestHeader() {}
  send() {
    // The whole-file check answers at once; uploads wait for the test to drive them.
    if (this.url.endsWith("/uploads/check")) {
      setTimeout(() => {
        this.status = 200;
        this.responseText = JSON.stringify(checkAnswer());
        this.onload?.();
      }, 0);
      return;
    }
    FakeUploadRequest.sent.push(this);
  }
  abort() {
    this.aborted = true;
    this.onabort?.();
  }
}

beforeEach(() => {
  savedMapping = null;
  checkAnswer = goodCheck;
  FakeUploadRequest.sent = [];
  vi.stubGlobal("XMLHttpRequest", FakeUploadRequest);
  vi.stubGlobal(
    "fetch",
    vi.fn(async (url: string) => {
      const answer = answers[url];
      return new Response(JSON.stringify(answer ? answer() : { error: { code: "not_found", message: "no fixture" } }), { status: answer ? 200 : 404 });
    }),
  );
});

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function renderWizard(url: string) {
  const queryClient = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  queryClient.setQueryData(["sites", "list"], [site]);
  const router = createMemoryRouter([{ path: "/upload", element: <UploadPage /> }], { initialEntries: [url] });
  render(
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>,
  );
}

const foreignLog = (name = "trip.csv") => new File(["Timestamp (UTC);FWHM [arcsec];Airmass;Notes\n2026-03-01 23:00:00;0.81;1.12;ok\n"], name, { type: "text/csv" });

describe("upload wizard", () => {
  it("preselects the campaign from the address and proposes a mapping from the file's headers", async () => {
    renderWizard("/upload?campaign=7");
    await waitFor(() => expect((screen.getByLabelText("Campaign the logs belong to") as HTMLSelectElement).value).toBe("7"));
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog()] } });
    await waitFor(() => expect((screen.getByLabelText(/Time of the sample/) as HTMLSelectElement).value).toBe("Timestamp (UTC)"), { timeout: 8000 });
    expect(screen.getByText(/Proposed from the column names of trip.csv/)).toBeTruthy();
    await waitFor(() => expect((screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement).disabled).toBe(false), { timeout: 4000 });
    expect(screen.getByTestId("check-summary").textContent).toBe("All 1 rows checked: 1 usable, 0 with a problem. Nothing has been stored yet.");
  });

  it("fills in the campaign's saved mapping when it fits the file", async () => {
    savedMapping = { mapping: { time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM [arcsec]", zenith_deg: "Airmass" } };
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog()] } });
    await screen.findByText(/mapping saved for this campaign fits/);
    // The saved mapping, not the proposal: the pointing column is read as a zenith angle.
    expect((screen.getByLabelText(/Zenith angle of the star/) as HTMLSelectElement).value).toBe("Airmass");
  });

  it("keeps the upload button off until the mapping can be read", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [new File(["When;Value\n1;2\n"], "odd.csv")] } });
    await screen.findByRole("alert", { name: "Mapping problems" });
    expect((screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement).disabled).toBe(true);
  });

  it("refuses a batch whose files have different columns, since one mapping serves them all", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    const other = new File(["time_utc,seeing_arcsec,zenith_deg\n2026-03-02T01:00:00Z,0.7,20\n"], "native.csv");
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog(), other] } });
    await screen.findByText(/native.csv has different columns from trip.csv/);
    expect((screen.getByRole("button", { name: "Upload 2 files" }) as HTMLButtonElement).disabled).toBe(true);
  });

  it("cancels a file during its transfer, says it was not stored and leaves the rest of the batch unsent", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog(), foreignLog("trip-2.csv")] } });
    const uploadButton = await screen.findByRole("button", { name: "Upload 2 files" });
    await waitFor(() => expect((uploadButton as HTMLButtonElement).disabled).toBe(false), { timeout: 4000 });
    fireEvent.click(uploadButton);

    await waitFor(() => expect(FakeUploadRequest.sent).toHaveLength(1));
    const request = FakeUploadRequest.sent[0];
    expect(request?.url).toBe("/api/campaigns/7/uploads");
    act(() => request?.upload.onprogress?.({ lengthComputable: true, loaded: 40, total: 100 }));
    expect(screen.getByRole("progressbar", { name: "Sending to the server" }).getAttribute("aria-valuenow")).toBe("40");

    fireEvent.click(screen.getByRole("button", { name: "Cancel sending trip.csv" }));
    await screen.findByText("Cancelled during the transfer: the file was not stored. Nothing of it is kept on the server.");
    expect(request?.aborted).toBe(true);
    expect(screen.queryByRole("progressbar")).toBeNull();
    expect(screen.queryByRole("button", { name: /^Cancel/ })).toBeNull();
    expect(screen.getByText("Not sent: the upload was cancelled before this file.")).toBeTruthy();
    // The second file was never sent, and the wizard says how to start again.
    expect(FakeUploadRequest.sent).toHaveLength(1);
    expect(screen.getByText("Cancelled. Choose the files again above to upload them.")).toBeTruthy();
  });

  it("warns that the server may have the file when the cancel comes after every byte was sent", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog()] } });
    const uploadButton = await screen.findByRole("button", { name: "Upload" });
    await waitFor(() => expect((uploadButton as HTMLButtonElement).disabled).toBe(false), { timeout: 4000 });
    fireEvent.click(uploadButton);
    await waitFor(() => expect(FakeUploadRequest.sent).toHaveLength(1));
    act(() => FakeUploadRequest.sent[0]?.upload.onprogress?.({ lengthComputable: true, loaded: 100, total: 100 }));
    fireEvent.click(screen.getByRole("button", { name: "Cancel sending trip.csv" }));
    await screen.findByText(/Cancelled after the whole file had been sent: the server may have stored it/);
  });

  it("asks for an explicit 'store it anyway' when the check finds no usable row, and a confirmation when most rows are rejected", async () => {
    checkAnswer = () => ({
      ...goodCheck(),
      rowsRead: 60,
      usable: 0,
      rejected: 60,
      rejectedByReason: { unreadable_time: 60 },
      problemLines: [{ line: 2, reason: "unreadable_time", message: "The time 2460000.5 is not an ISO 8601 time.", rawLine: "2460000.5;0.81;1.12;ok" }],
    });
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog()] } });
    await screen.findByText(/No row of this file can be used/, undefined, { timeout: 4000 });
    expect(screen.getByText("2460000.5;0.81;1.12;ok")).toBeTruthy();
    const upload = screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement;
    expect(upload.disabled).toBe(true);
    fireEvent.click(screen.getByLabelText(/Store it anyway/));
    await waitFor(() => expect(upload.disabled).toBe(false), { timeout: 4000 });

    cleanup();
    checkAnswer = () => ({ ...goodCheck(), rowsRead: 10, usable: 4, rejected: 6, rejectedByReason: { missing_value: 6 } });
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog()] } });
    await screen.findByText(/Most rows of this file would be rejected: 6 of 10 cannot be used/, undefined, { timeout: 4000 });
    expect((screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement).disabled).toBe(true);
    fireEvent.click(screen.getByLabelText(/Upload it anyway/));
    await waitFor(() => expect((screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement).disabled).toBe(false), { timeout: 4000 });
  });

  it("removes one file from a batch before the upload", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    fireEvent.change(screen.getByLabelText("Log files"), { target: { files: [foreignLog(), foreignLog("trip-2.csv")] } });
    await screen.findByRole("button", { name: "Upload 2 files" }, { timeout: 4000 });
    fireEvent.click(screen.getByRole("button", { name: "Remove trip-2.csv from this batch" }));
    await waitFor(() => expect(screen.queryByRole("button", { name: "Remove trip-2.csv from this batch" })).toBeNull(), { timeout: 4000 });
    await waitFor(() => expect((screen.getByRole("button", { name: "Upload" }) as HTMLButtonElement).disabled).toBe(false), { timeout: 4000 });
  });

  it("keeps the hidden file input out of the tab order (the Choose files button opens it)", async () => {
    renderWizard("/upload?campaign=7");
    await screen.findByText(/60 mm subapertures/);
    expect(screen.getByLabelText("Log files").getAttribute("tabindex")).toBe("-1");
  });
});
