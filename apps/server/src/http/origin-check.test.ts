import request from "supertest";
import { describe, expect, it } from "vitest";
import { parseEnv } from "../env.server";
import { DEMO_PASSWORD_FOR_TESTS, createTestServer } from "../test-support";

const signIn = { email: "lead@calmcrest.test", password: DEMO_PASSWORD_FOR_TESTS };
const { app: publicApp } = await createTestServer({ publicUrl: "https://calmcrest.example.org" });
const { app: localApp } = await createTestServer({ publicUrl: null, env: { PORT: "4999" } });

describe("the Origin check against CALMCREST_PUBLIC_URL", () => {
  it("accepts the configured origin, whatever Host the request names", async () => {
    const response = await request(publicApp).post("/api/auth/sign-in").set({ Origin: "https://calmcrest.example.org", Host: "10.0.0.7:4173" }).send(signIn);
    expect(response.status).toBe(200);
  });

  it("accepts the default port written out (https://host:443 is https://host)", async () => {
    const response = await request(publicApp).post("/api/auth/sign-in").set({ Origin: "https://calmcrest.example.org:443" }).send(signIn);
    expect(response.status).toBe(200);
  });

  for (const [what, origin] of [
    ["another scheme", "http://calmcrest.example.org"],
    ["another port", "https://calmcrest.example.org:8443"],
    ["another host", "https://evil.example.org"],
    ["a look-alike host", "https://calmcrest.example.org.evil.example"],
    ["the opaque origin null", "null"],
  ] as const) {
    it(`rejects ${what} with 403 even when Host matches the Origin`, async () => {
      const host = origin === "null" ? "calmcrest.example.org" : new URL(origin).host;
      const response = await request(publicApp).post("/api/auth/sign-in").set({ Origin: origin, Host: host }).send(signIn);
      expect(response.status).toBe(403);
      expect(response.body.error.code).toBe("bad_origin");
    });
  }
});

describe("the default public origin", () => {
  it("is this port on localhost, 127.0.0.1 or [::1], over http", () => {
    const env = parseEnv({ PORT: "4999" });
    expect(env.publicOrigin).toBeNull();
    expect(env.allowedOrigins).toEqual(["http://localhost:4999", "http://127.0.0.1:4999", "http://[::1]:4999"]);
  });

  it("is exactly CALMCREST_PUBLIC_URL's origin when that is set (no loopback aliases)", () => {
    const env = parseEnv({ CALMCREST_PUBLIC_URL: "https://Calmcrest.Example.org/some/path" });
    expect(env.allowedOrigins).toEqual(["https://calmcrest.example.org"]);
  });

  it("refuses a CALMCREST_PUBLIC_URL that is not an http(s) address", () => {
    expect(() => parseEnv({ CALMCREST_PUBLIC_URL: "calmcrest.example.org" })).toThrow(/CALMCREST_PUBLIC_URL/);
    expect(() => parseEnv({ CALMCREST_PUBLIC_URL: "ftp://calmcrest.example.org" })).toThrow(/http/);
  });

  for (const origin of ["http://localhost:4999", "http://127.0.0.1:4999", "http://[::1]:4999"]) {
    it(`lets a page from ${origin} sign in on a server with the default`, async () => {
      const response = await request(localApp).post("/api/auth/sign-in").set({ Origin: origin }).send(signIn);
      expect(response.status).toBe(200);
    });
  }

  for (const origin of ["http://localhost:5000", "https://localhost:4999", "http://calmcrest.test"]) {
    it(`refuses ${origin} on a server with the default for port 4999`, async () => {
      const response = await request(localApp).post("/api/auth/sign-in").set({ Origin: origin, Host: new URL(origin).host }).send(signIn);
      expect(response.status).toBe(403);
    });
  }
});
