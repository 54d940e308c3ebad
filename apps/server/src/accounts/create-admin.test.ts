import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import request from "supertest";
import { afterAll, describe, expect, it } from "vitest";
import { SAME_ORIGIN, createTestServer } from "../test-support";

const here = dirname(fileURLToPath(import.meta.url));
const tsx = join(here, "../../node_modules/.bin/tsx");
const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-create-admin-"));
afterAll(() => rmSync(dataDir, { recursive: true, force: true }));

function createAdmin(args: string[], stdin: string) {
  return spawnSync(tsx, [join(here, "create-admin.ts"), ...args], { input: stdin, encoding: "utf8", env: { ...process.env, CALMCREST_DATA_DIR: dataDir, NODE_ENV: "production" }, timeout: 60_000 });
}

describe("npm run create-admin", () => {
  it("refuses a password that breaks the rules, creates the administrator with a good one, and refuses the same e-mail twice", async () => {
    const weak = createAdmin(["--email", "Ada@Example.org", "--name", "Ada Quispe"], "adaquispe2026\n");
    expect(weak.status).toBe(1);
    expect(weak.stderr).toMatch(/Do not use your e-mail address or your name/);

    const made = createAdmin(["--email", "Ada@Example.org", "--name", "Ada Quispe"], "basalt-harbour-quill-9\n");
    expect(made.stderr).toMatch(/Password rules: At least 12 characters/);
    expect(made.status).toBe(0);
    expect(made.stdout).toMatch(/created the administrator Ada Quispe <ada@example.org>/);

    const again = createAdmin(["--email", "ada@example.org", "--name", "Ada Again"], "basalt-harbour-quill-9\n");
    expect(again.status).toBe(1);
    expect(again.stderr).toMatch(/exists already/);

    const { app, context } = await createTestServer({ dataDir, seed: "none" });
    const agent = request.agent(app);
    const signIn = await agent.post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "ada@example.org", password: "basalt-harbour-quill-9" });
    expect(signIn.status).toBe(200);
    expect(signIn.body.role).toBe("admin");
    expect(await context.store.users.count()).toBe(1);
    const [row] = await context.store.audit.list({ targetType: "user" });
    expect(row?.details).toMatchObject({ role: "admin", via: "command_line" });
  });

  it("asks for both options", () => {
    const missing = createAdmin(["--email", "x@example.org"], "");
    expect(missing.status).toBe(1);
    expect(missing.stderr).toMatch(/Give both --email and --name/);
  });
});
