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
  it("keeps sessions 30 days, 7 idle, unless told otherwise; refuses a lifetime that isn't a positive number", () => {
    expect(loadEnv({})).toMatchObject({ SESSION_MAX_DAYS: 30, SESSION_IDLE_DAYS: 7 });
    expect(loadEnv({ SESSION_MAX_DAYS: "0.5", SESSION_IDLE_DAYS: "2" })).toMatchObject({ SESSION_MAX_DAYS: 0.5, SESSION_IDLE_DAYS: 2 });
    expect(() => loadEnv({ SESSION_MAX_DAYS: "0", SESSION_IDLE_DAYS: "a week" })).toThrow(/SESSION_MAX_DAYS: .*\n {2}SESSION_IDLE_DAYS: /);
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
