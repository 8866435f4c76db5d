import { describe, expect, it } from "vitest";
import { loadEnv } from "./env.server";

describe("loadEnv", () => {
  it("has working defaults for development", () => {
    const env = loadEnv({});
    expect(env).toMatchObject({ NODE_ENV: "development", PORT: 3000, DATABASE_URL: "file:data/fretcall.db" });
    expect(env.PUBLIC_URL).toBe("http://localhost:3000");
  });
  it("accepts a remote libSQL URL unchanged", () => {
    expect(loadEnv({ DATABASE_URL: "libsql://school.example:8080" }).DATABASE_URL).toBe("libsql://school.example:8080");
  });
  it("lists every problem in one clear error", () => {
    expect(() => loadEnv({ PORT: "eighty", DATABASE_URL: "mysql://x" })).toThrow(
      /PORT: .*\n {2}DATABASE_URL: must start with file:, libsql:, http\(s\): or ws\(s\):/,
    );
  });
  it("requires a session secret in production", () => {
    expect(() => loadEnv({ NODE_ENV: "production" })).toThrow(/SESSION_SECRET: is required in production/);
  });
  it("refuses a short session secret", () => {
    expect(() => loadEnv({ SESSION_SECRET: "short" })).toThrow(/SESSION_SECRET: must be at least 32 characters/);
  });
  it.each([
    [undefined, false],
    ["0", false],
    ["1", 1],
    ["2", 2],
    ["loopback", "loopback"],
    ["10.0.0.1, 10.0.0.0/8", "10.0.0.1, 10.0.0.0/8"],
  ])("TRUST_PROXY=%s → trust proxy %s", (value, trust) => {
    expect(loadEnv({ TRUST_PROXY: value }).trustProxy).toBe(trust);
  });
  it("refuses a TRUST_PROXY that would trust any client", () => {
    expect(() => loadEnv({ TRUST_PROXY: "true" })).toThrow(/TRUST_PROXY: must be 0, a hop count/);
  });
  it("takes a log level", () => {
    expect(loadEnv({}).LOG_LEVEL).toBe("info");
    expect(() => loadEnv({ LOG_LEVEL: "loud" })).toThrow(/LOG_LEVEL/);
  });
});
