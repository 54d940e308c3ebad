import { afterEach, describe, expect, it } from "vitest";
import { cleanup, fireEvent, render, screen } from "@testing-library/react";
import { createMemoryRouter, RouterProvider, useSearchParams } from "react-router-dom";
import { DEFAULT_FILTERS } from "@calmcrest/seeing-stats";
import { FilterPanel } from "./filter-panel";

function AddressProbe() {
  const [params] = useSearchParams();
  return <output data-testid="address">{params.toString()}</output>;
}

function renderAt(url: string) {
  const router = createMemoryRouter(
    [
      {
        path: "/sites/:siteId",
        element: (
          <>
            <FilterPanel />
            <AddressProbe />
          </>
        ),
      },
    ],
    { initialEntries: [url] },
  );
  render(<RouterProvider router={router} />);
}

afterEach(cleanup);

describe("FilterPanel", () => {
  it("fills its fields from the page address", () => {
    renderAt("/sites/3?from=2026-02-01&maxZenithDeg=45");
    expect((screen.getByLabelText(/From/) as HTMLInputElement).value).toBe("2026-02-01");
    expect((screen.getByLabelText(/Zenith limit/) as HTMLInputElement).value).toBe("45");
  });

  it("writes applied filters into the address and keeps the chosen night", () => {
    renderAt("/sites/3?night=2026-02-10");
    fireEvent.change(screen.getByLabelText(/To/), { target: { value: "2026-03-31" } });
    fireEvent.change(screen.getByLabelText(/Sun limit/), { target: { value: "-12" } });
    fireEvent.click(screen.getByRole("button", { name: "Apply" }));
    const address = new URLSearchParams(screen.getByTestId("address").textContent ?? "");
    expect(address.get("to")).toBe("2026-03-31");
    expect(address.get("sunMaxDeg")).toBe("-12");
    expect(address.get("night")).toBe("2026-02-10");
  });

  it("refuses a zenith limit beyond 90 degrees with the reason, leaving the address alone", () => {
    renderAt("/sites/3");
    fireEvent.change(screen.getByLabelText(/Zenith limit/), { target: { value: "95" } });
    fireEvent.click(screen.getByRole("button", { name: "Apply" }));
    expect(screen.getByText("The zenith limit must be more than 0° and at most 90°.")).toBeTruthy();
    expect(document.body.textContent).not.toContain("maxZenithDeg");
    expect(screen.getByTestId("address").textContent).toBe("");
  });

  it("refuses a window that ends before it starts (the shared schema's check), leaving the address alone", () => {
    renderAt("/sites/3");
    fireEvent.change(screen.getByLabelText(/From/), { target: { value: "2026-02-10" } });
    fireEvent.change(screen.getByLabelText(/To/), { target: { value: "2026-02-01" } });
    fireEvent.click(screen.getByRole("button", { name: "Apply" }));
    expect(screen.getByText(/must end on or after its first day/)).toBeTruthy();
    expect(screen.getByTestId("address").textContent).toBe("");
  });

  it("shows the engine's default filters as the placeholders of empty fields", () => {
    renderAt("/sites/3");
    expect((screen.getByLabelText(/Zenith limit/) as HTMLInputElement).placeholder).toBe(String(DEFAULT_FILTERS.maxZenithDeg));
    expect((screen.getByLabelText(/Sun limit/) as HTMLInputElement).placeholder).toBe(String(DEFAULT_FILTERS.sunMaxDeg));
  });

  it("clears every filter on reset", () => {
    renderAt("/sites/3?from=2026-02-01&minFlux=200");
    fireEvent.click(screen.getByRole("button", { name: "Reset to standard" }));
    expect(screen.getByTestId("address").textContent).toBe("");
    expect((screen.getByLabelText(/From/) as HTMLInputElement).value).toBe("");
  });

  it("clears a mistyped value on reset even when the address already holds the standard settings", () => {
    renderAt("/sites/3");
    fireEvent.change(screen.getByLabelText(/Zenith limit/), { target: { value: "95" } });
    fireEvent.click(screen.getByRole("button", { name: "Apply" }));
    fireEvent.click(screen.getByRole("button", { name: "Reset to standard" }));
    expect((screen.getByLabelText(/Zenith limit/) as HTMLInputElement).value).toBe("");
    expect(screen.queryByText(/The zenith limit must be/)).toBeNull();
  });

  it("says which values of a mistyped link were ignored", () => {
    renderAt("/sites/3?minFlux=lots");
    expect(screen.getByRole("alert").textContent).toContain("minFlux");
  });

  it("keeps anisotropic samples only when the switch is ticked, and reads the switch from the address", () => {
    renderAt("/sites/3");
    const keep = screen.getByRole("checkbox", { name: /Keep anisotropic samples/ }) as HTMLInputElement;
    expect(keep.checked).toBe(false);
    fireEvent.click(keep);
    fireEvent.click(screen.getByRole("button", { name: "Apply" }));
    expect(screen.getByTestId("address").textContent).toBe("keepAnisotropic=true");
    cleanup();
    renderAt("/sites/3?keepAnisotropic=true");
    expect((screen.getByRole("checkbox", { name: /Keep anisotropic samples/ }) as HTMLInputElement).checked).toBe(true);
  });
});
