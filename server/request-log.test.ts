import express from "express";
import type { AddressInfo } from "node:net";
import { Writable } from "node:stream";
import { pino } from "pino";
import { describe, expect, it } from "vitest";
import { loggablePath, requestLog } from "./request-log";

describe("request log", () => {
  it("logs id, method, path, status and duration, and no secret", async () => {
    const lines: string[] = [];
    const sink = new Writable({
      write(chunk: Buffer, _enc, done) {
        lines.push(...String(chunk).split("\n").filter(Boolean));
        done();
      },
    });
    const app = express();
    app.use(requestLog(pino({ level: "info" }, sink)));
    app.all("/{*path}", (_req, res) => void res.status(201).cookie("fretcall_session", "cookie-secret").send("ok"));
    const server = app.listen(0, "127.0.0.1");
    await new Promise((done) => server.once("listening", done));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    const res = await fetch(`${base}/reset/reset-token-secret?studio=query-secret`, {
      method: "POST",
      headers: { Authorization: "Bearer fcl_bearer-secret", Cookie: "fretcall_session=cookie-secret" },
      body: new URLSearchParams({ password: "password-secret" }),
    });
    server.close();
    expect(res.status).toBe(201);
    expect(lines).toHaveLength(1);
    const line = JSON.parse(lines[0]!) as { req: { id: string; method: string; path: string }; res: { statusCode: number }; responseTime: number };
    expect(line.req).toEqual({ id: res.headers.get("x-request-id"), method: "POST", path: "/reset/:token" });
    expect(line.req.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(line.res).toEqual({ statusCode: 201 });
    expect(line.responseTime).toEqual(expect.any(Number));
    expect(lines[0]).not.toMatch(/secret/);
  });

  it.each([
    ["/invite/abc123", "/invite/:token"],
    ["/reset/abc/more", "/reset/:token/more"],
    ["/signup?studio=sealed", "/signup"],
    ["/teach/classes/c1#x", "/teach/classes/c1"],
    [undefined, "/"],
  ])("%s is logged as %s", (url, path) => expect(loggablePath(url)).toBe(path));
});
