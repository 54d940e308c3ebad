import { afterEach, describe, expect, it } from "vitest";
import { useState } from "react";
import { cleanup, fireEvent, render, screen } from "@testing-library/react";
import type { ColumnMapping } from "@calmcrest/seeing-stats";
import { readLogHead } from "../../lib/log-head";
import { MappingEditor, unitNote } from "./mapping-editor";

const head = readLogHead("Timestamp (UTC);FWHM [arcsec];Airmass;Star counts\n2026-03-01 23:00:00;0.81;1.12;5400\n2026-03-01 23:01:00;0.77;1.13;5380\n");

// The header of data-samples/native-interlaced.csv: variances at the base exposure and at twice it.
const interlacedHead = readLogHead(
  "# interlaced exposures\ntime_utc,var_long_arcsec2,var_trans_arcsec2,var_long_2x_arcsec2,var_trans_2x_arcsec2,zenith_deg,flux\n2025-09-14T23:54:36Z,0.354415,0.261454,0.323142,0.251640,40.40,20174\n",
);

let latest: ColumnMapping = {};
function Harness({ initial, pixelScaleArcsec = null, source = head, editableWavelength = false }: { initial: ColumnMapping; pixelScaleArcsec?: number | null; source?: typeof head; editableWavelength?: boolean }) {
  const [mapping, setMapping] = useState(initial);
  const [wavelengthText, setWavelengthText] = useState("");
  latest = mapping;
  return (
    <MappingEditor
      headers={source.headers}
      rows={source.rows}
      mapping={mapping}
      onChange={(next) => {
        latest = next;
        setMapping(next);
      }}
      pixelScaleArcsec={pixelScaleArcsec}
      wavelengthNm={550}
      wavelength={editableWavelength ? { text: wavelengthText, onChange: setWavelengthText, problem: null } : undefined}
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
    expect(screen.getByRole("status").textContent).toMatch(/Every needed field has a column/);
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

  it("shows the variances at twice the exposure time as optional rows of the seeing measure, filled from their native names", () => {
    render(<Harness initial={interlacedHead.proposedMapping} source={interlacedHead} pixelScaleArcsec={0.5} />);
    const long2x = screen.getByLabelText(/Longitudinal variance at twice the exposure time/) as HTMLSelectElement;
    expect(long2x.value).toBe("var_long_2x_arcsec2");
    expect((screen.getByLabelText(/Transverse variance at twice the exposure time/) as HTMLSelectElement).value).toBe("var_trans_2x_arcsec2");
    expect(long2x.closest("tr")?.textContent).toMatch(/\(arcsec², optional\)/);
    expect(long2x.closest("tbody")?.textContent).toMatch(/^Seeing measure/);
    expect(screen.getByText("0.323142")).toBeTruthy();
    expect(screen.getByRole("status").textContent).toMatch(/Every needed field has a column/);
  });

  it("moves the 2x columns with the variances when the unit changes, and lists a half-mapped pair as a problem", () => {
    render(<Harness initial={interlacedHead.proposedMapping} source={interlacedHead} pixelScaleArcsec={0.5} />);
    fireEvent.click(screen.getByLabelText(/pixel² \(× pixel scale/));
    expect(latest).toMatchObject({ var_long_px2: "var_long_arcsec2", var_long_2x_px2: "var_long_2x_arcsec2", var_trans_2x_px2: "var_trans_2x_arcsec2" });
    expect(latest.var_long_2x_arcsec2).toBeUndefined();
    expect((screen.getByLabelText(/Longitudinal variance at twice the exposure time/) as HTMLSelectElement).value).toBe("var_long_2x_arcsec2");
    fireEvent.change(screen.getByLabelText(/Transverse variance at twice the exposure time/), { target: { value: "" } });
    expect(screen.getByRole("alert", { name: "Mapping problems" }).textContent).toMatch(/Only one of var_long_2x_px2 and var_trans_2x_px2/);
  });

  it("blocks pixel² variances when the campaign has no pixel scale", () => {
    const pixelHead = { time_utc: "Timestamp (UTC)", var_long_px2: "FWHM [arcsec]", var_trans_px2: "Star counts", airmass: "Airmass" };
    render(<Harness initial={pixelHead} />);
    expect(screen.getByRole("alert", { name: "Mapping problems" }).textContent).toMatch(/pixel scale/);
  });
});

describe("the unit after a field's label", () => {
  it("is not repeated when the label names it already, and says optional where it helps", () => {
    expect(unitNote("Airmass of the star (sec z)", "sec z", false)).toBe("");
    expect(unitNote("Time of the sample (ISO 8601, UTC)", "UTC", false)).toBe("");
    expect(unitNote("Star flux", "counts", false)).toBe("(counts)");
    expect(unitNote("Longitudinal variance at twice the exposure time", "arcsec²", true)).toBe("(arcsec², optional)");
  });

  it("shows only the units the file's measure needs: no variance unit for a seeing column, the wavelength editable for it", () => {
    render(<Harness initial={head.proposedMapping} editableWavelength />);
    expect(screen.queryByRole("radiogroup", { name: "Variance unit" })).toBeNull();
    expect(screen.getByRole("radiogroup", { name: "Pointing" })).toBeTruthy();
    const wavelength = screen.getByLabelText(/Measurement wavelength of this file/) as HTMLInputElement;
    expect(wavelength.placeholder).toBe("550");
    expect(screen.getByText(/Empty: the campaign's 550 nm. The seeing is scaled to 500 nm/)).toBeTruthy();
  });

  it("shows the variance unit and no wavelength field for variances, which do not depend on the wavelength", () => {
    render(<Harness initial={interlacedHead.proposedMapping} source={interlacedHead} pixelScaleArcsec={0.5} editableWavelength />);
    expect(screen.getByRole("radiogroup", { name: "Variance unit" })).toBeTruthy();
    expect(screen.queryByLabelText(/Measurement wavelength of this file/)).toBeNull();
    expect(screen.getByText(/Not needed: seeing from image-motion variances does not depend on it/)).toBeTruthy();
  });
});
