import { describe, expect, it } from "vitest";
import { homeFor, mayUse, navFor } from "./navigation";

describe("navigation by role", () => {
  it("shows the field screens to field engineers but not people management", () => {
    expect(navFor("engineer").map((item) => item.label)).toEqual(["Sites", "Compare", "Upload logs"]);
  });

  it("shows committee members only reports", () => {
    expect(navFor("committee").map((item) => item.label)).toEqual(["Reports"]);
    expect(homeFor("committee")).toBe("/reports");
    expect(mayUse("committee", "/sites/abc")).toBe(false);
  });

  it("lets admins manage people and read sites", () => {
    expect(navFor("admin").map((item) => item.to)).toEqual(["/sites", "/compare", "/reports", "/admin/people", "/admin/audit", "/admin/outbox"]);
    expect(mayUse("admin", "/admin/people")).toBe(true);
    expect(mayUse("admin", "/admin/outbox")).toBe(true);
    expect(mayUse("lead", "/admin/outbox")).toBe(false);
    expect(mayUse("lead", "/admin/people")).toBe(false);
  });

  it("lets the field roles compare sites, and not committee members", () => {
    expect(navFor("lead").map((item) => item.to)).toContain("/compare");
    expect(mayUse("engineer", "/compare")).toBe(true);
    expect(mayUse("committee", "/compare")).toBe(false);
  });

  it("lets the field roles follow a sign-in link back to a campaign page, but not committee members", () => {
    expect(mayUse("engineer", "/campaigns/4")).toBe(true);
    expect(mayUse("committee", "/campaigns/4")).toBe(false);
  });
});
