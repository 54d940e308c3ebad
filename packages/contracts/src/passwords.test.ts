import { describe, expect, it } from "vitest";
import { createUserSchema } from "./users";
import { passwordProblems } from "./passwords";
import { roleChangeEffects } from "./users";
import { AUDIT_ACTIONS, describeAuditEntry, isAuditAction } from "./audit";

const person = { email: "lena.marchetti@calmcrest.test", name: "Lena Marchetti" };

describe("the password rules", () => {
  it("accept a long password that has nothing of the person in it", () => {
    expect(passwordProblems("granite lantern orbit", person)).toEqual([]);
  });

  it("count characters and say how many the password has", () => {
    expect(passwordProblems("elevenchars", person)).toEqual(["Use at least 12 characters (this one has 11)."]);
    expect(passwordProblems("x".repeat(201), person)).toContain("Use at most 200 characters.");
  });

  it("refuse the e-mail, its name part and the person's name, whatever the case and punctuation", () => {
    const rule = "Do not use your e-mail address or your name in the password.";
    expect(passwordProblems("lena.marchetti@calmcrest.test", person)).toContain(rule);
    expect(passwordProblems("LenaMarchetti!!", person)).toContain(rule);
    expect(passwordProblems("my-lena_marchetti-1", person)).toContain(rule);
  });

  it("refuse the shipped common passwords without regard to case, the published demo password included", () => {
    expect(passwordProblems("QWERTY123456", person)).toEqual(["This is a commonly used password that is guessed early; choose another."]);
    expect(passwordProblems("calmcrest-demo", person)).toHaveLength(1);
  });

  it("are part of the new-account schema, on the password field", () => {
    const result = createUserSchema.safeParse({ ...person, role: "lead", password: "Lena-Marchetti-1" });
    expect(result.success).toBe(false);
    expect(result.error?.issues.map((issue) => issue.path.join("."))).toEqual(["password"]);
  });
});

describe("a role change", () => {
  it("lists what the person gains and loses", () => {
    const { gains, loses } = roleChangeEffects("admin", "lead");
    expect(gains).toEqual(["create and change sites and campaigns", "upload logs to every campaign", "exclude time windows"]);
    expect(loses).toEqual(["manage people, roles and campaign access", "read the audit log"]);
    expect(roleChangeEffects("committee", "committee")).toEqual({ gains: [], loses: [] });
  });
});

describe("the audit vocabulary", () => {
  it("knows its own actions only, and writes a sentence for each", () => {
    expect(isAuditAction("user.role")).toBe(true);
    expect(isAuditAction("toString")).toBe(false);
    for (const action of AUDIT_ACTIONS) expect(describeAuditEntry(action, {}, "7").length).toBeGreaterThan(5);
    expect(describeAuditEntry("user.role", { from: "admin", to: "lead" }, "u1")).toBe("Role Administrator → Survey lead");
    expect(describeAuditEntry("member.add", { campaignId: 3, memberId: "u1" }, "3:u1", (id) => (id === "u1" ? "Lena Marchetti" : undefined))).toBe("Campaign 3 opened to Lena Marchetti");
  });
});
