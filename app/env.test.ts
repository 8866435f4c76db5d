import { describe, expect, it } from "vitest";
import { loadEnv, nodeAddressOf } from "./env.server";

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
  it("ends idle rooms after 3 hours unless told otherwise, fractions allowed", () => {
    expect(loadEnv({}).ROOM_IDLE_HOURS).toBe(3);
    expect(loadEnv({ ROOM_IDLE_HOURS: "0.5" }).ROOM_IDLE_HOURS).toBe(0.5);
    expect(() => loadEnv({ ROOM_IDLE_HOURS: "never" })).toThrow(/ROOM_IDLE_HOURS: /);
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
  it("runs as one node without Redis unless REDIS_URL is set", () => {
    const env = loadEnv({});
    expect(env.REDIS_URL).toBeUndefined();
    expect(env.NODE_ID).toMatch(/^node-[0-9a-f]{12}$/);
    expect(loadEnv({}).NODE_ID).not.toBe(env.NODE_ID);
    expect(loadEnv({ REDIS_URL: "redis://127.0.0.1:6380", NODE_ID: "a-1", NODE_ADDRESS: "10.0.0.5:3000" })).toMatchObject({
      REDIS_URL: "redis://127.0.0.1:6380",
      NODE_ID: "a-1",
      NODE_ADDRESS: "10.0.0.5:3000",
    });
  });
  it("refuses a cluster setting that leases or forwarding could not use", () => {
    expect(() => loadEnv({ REDIS_URL: "127.0.0.1:6379", NODE_ID: "a|b", NODE_ADDRESS: "somewhere" })).toThrow(
      /REDIS_URL: must be a redis:\/\/ .*\n {2}NODE_ID: .*\n {2}NODE_ADDRESS: must be host:port/,
    );
  });
  it("needs NODE_ADDRESS for a cluster in production beyond loopback, and guesses loopback elsewhere", () => {
    const production = { NODE_ENV: "production", SESSION_SECRET: "x".repeat(32), MAIL_CAPTURE: "1", REDIS_URL: "redis://r:6379" };
    expect(() => loadEnv(production)).toThrow(/NODE_ADDRESS: is required in production with REDIS_URL/);
    expect(loadEnv({ ...production, HOST: "127.0.0.1" }).NODE_ADDRESS).toBeUndefined();
    expect(nodeAddressOf(loadEnv({ ...production, NODE_ADDRESS: "[::1]:4000" }), 4000)).toBe("[::1]:4000");
    expect(nodeAddressOf(loadEnv({ REDIS_URL: "redis://r:6379" }), 41234)).toBe("127.0.0.1:41234");
  });
});
