import { describe, expect, it } from "vitest";
import { columnMappingSchema, createCampaignSchema, monitorSettingsSchema } from "./campaigns";
import { signInSchema } from "./auth";
import { samplesQuerySchema } from "./samples";
import { summaryQuerySchema } from "./summaries";

describe("signInSchema", () => {
  it("stores e-mail lower-case and trimmed, since people type it in any case", () => {
    expect(signInSchema.parse({ email: "  Lead@Calmcrest.TEST ", password: "x" })).toEqual({ email: "lead@calmcrest.test", password: "x" });
  });

  it("names both fields when they are missing", () => {
    const result = signInSchema.safeParse({});
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((issue) => issue.path.join("."))).toEqual(["email", "password"]);
  });
});

describe("monitorSettingsSchema", () => {
  it("defaults to 500 nm and the Tokovinin Z-tilt response", () => {
    expect(monitorSettingsSchema.parse({ apertureMm: 60, baselineMm: 200 })).toEqual({ apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" });
  });

  it("refuses overlapping subapertures and says which field and why", () => {
    const result = monitorSettingsSchema.safeParse({ apertureMm: 60, baselineMm: 50 });
    expect(result.success).toBe(false);
    expect(result.error?.issues[0]?.path).toEqual(["baselineMm"]);
    expect(result.error?.issues[0]?.message).toMatch(/cannot overlap/);
  });

  it("names the unit in the message for a negative wavelength", () => {
    const result = monitorSettingsSchema.safeParse({ apertureMm: 60, baselineMm: 200, wavelengthNm: -500 });
    expect(result.error?.issues[0]?.message).toBe("wavelengthNm must be a positive number of nanometres.");
  });
});

describe("columnMappingSchema", () => {
  it("accepts the engine's native field names only", () => {
    expect(columnMappingSchema.parse({ time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM" })).toEqual({ time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM" });
    expect(columnMappingSchema.safeParse({ fwhm: "FWHM" }).success).toBe(false);
  });
});

describe("createCampaignSchema", () => {
  it("refuses an end date before the start date", () => {
    const campaign = { name: "North mast", monitor: { apertureMm: 60, baselineMm: 200 }, startDate: "2026-05-01" };
    expect(createCampaignSchema.safeParse({ ...campaign, endDate: "2026-06-01" }).success).toBe(true);
    const result = createCampaignSchema.safeParse({ ...campaign, endDate: "2026-04-01" });
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((issue) => issue.path.join("."))).toContain("endDate");
  });
});

describe("summaryQuerySchema", () => {
  it("reads numbers from query strings and checks their range", () => {
    expect(summaryQuerySchema.parse({ maxZenithDeg: "45", sunMaxDeg: "-12" })).toMatchObject({ maxZenithDeg: 45, sunMaxDeg: -12 });
    expect(summaryQuerySchema.safeParse({ maxZenithDeg: "95" }).success).toBe(false);
  });

  it("uses the engine's limits: a zenith limit of exactly 90 degrees passes, 0 does not", () => {
    expect(summaryQuerySchema.safeParse({ maxZenithDeg: "90" }).success).toBe(true);
    const zero = summaryQuerySchema.safeParse({ maxZenithDeg: "0" });
    expect(zero.error?.issues[0]?.message).toMatch(/The zenith limit \(maxZenithDeg\) must be more than 0° and at most 90°/);
  });

  it("refuses a window whose end is before its start, naming to; a bare to date includes its whole day", () => {
    const inverted = summaryQuerySchema.safeParse({ from: "2025-03-02", to: "2025-03-01" });
    expect(inverted.success).toBe(false);
    expect(inverted.error?.issues.map((issue) => issue.path.join("."))).toEqual(["to"]);
    expect(summaryQuerySchema.safeParse({ from: "2025-03-01", to: "2025-03-01" }).success).toBe(true);
    expect(summaryQuerySchema.safeParse({ from: "2025-03-01T22:00:00Z", to: "2025-03-01" }).success).toBe(true);
    expect(samplesQuerySchema.safeParse({ from: "2025-03-02T00:00:01Z", to: "2025-03-01" }).success).toBe(false);
  });
});
