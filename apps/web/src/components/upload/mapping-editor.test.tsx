import { afterEach, describe, expect, it } from "vitest";
import { useState } from "react";
import { cleanup, fireEvent, render, screen } from "@testing-library/react";
import type { ColumnMapping } from "@calmcrest/seeing-stats";
import { readLogHead } from "../../lib/log-head";
import { MappingEditor } from "./mapping-editor";

const head = readLogHead("Timestamp (UTC);FWHM [arcsec];Airmass;Star counts\n2026-03-01 23:00:00;0.81;1.12;5400\n2026-03-01 23:01:00;0.77;1.13;5380\n");

let latest: ColumnMapping = {};
function Harness({ initial, pixelScaleArcsec = null }: { initial: ColumnMapping; pixelScaleArcsec?: number | null }) {
  const [mapping, setMapping] = useState(initial);
  latest = mapping;
  return (
    <MappingEditor
      headers={head.headers}
      rows={head.rows}
      mapping={mapping}
      onChange={(next) => {
        latest = next;
        setMapping(next);
      }}
      pixelScaleArcsec={pixelScaleArcsec}
      wavelengthNm={550}
    />
  );
}

afterEach(cleanup);

describe("MappingEditor", () => {
  it("shows the proposal for a non-native header layout as complete, with first values", () => {
    render(<Harness initial={head.proposedMapping} />);
    expect((screen.getByLabelText(/Time of the sample/) as HTMLSelectElement).value).toBe("Timestamp (UTC)");
    expect((screen.getByLabelText(/Seeing FWHM/) as HTMLSelectElement).value).toBe("FWHM [arcsec]");
    expect(screen.getByText("0.81 · 0.77")).toBeTruthy();
    expect(screen.getByRole("status").textContent).toMatch(/complete/);
  });

  it("lists the problem when the time column is taken away, and maps a column the user picks", () => {
    render(<Harness initial={head.proposedMapping} />);
    fireEvent.change(screen.getByLabelText(/Time of the sample/), { target: { value: "" } });
    expect(screen.getByRole("alert", { name: "Mapping problems" }).textContent).toMatch(/time_utc/);
    fireEvent.change(screen.getByLabelText(/Star flux/), { target: { value: "Star counts" } });
    expect(latest.flux).toBe("Star counts");
  });

  it("switches the pointing column between airmass and zenith angle", () => {
    render(<Harness initial={head.proposedMapping} />);
    fireEvent.click(screen.getByLabelText(/zenith angle \(degrees\)/));
    expect(latest.zenith_deg).toBe("Airmass");
    expect(latest.airmass).toBeUndefined();
  });

  it("blocks pixel² variances when the campaign has no pixel scale", () => {
    const pixelHead = { time_utc: "Timestamp (UTC)", var_long_px2: "FWHM [arcsec]", var_trans_px2: "Star counts", airmass: "Airmass" };
    render(<Harness initial={pixelHead} />);
    expect(screen.getByRole("alert", { name: "Mapping problems" }).textContent).toMatch(/pixel scale/);
  });
});
