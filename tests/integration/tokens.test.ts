import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const bearer = (token: string) => ({ headers: { Authorization: `Bearer ${token}` } });

describe("personal API tokens", () => {
  it("are created once, work as Bearer on the JSON API only, and stop working when revoked", async () => {
    const teacher = new Client(server.url);
    await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD });
    const page = await (await teacher.post("/settings/tokens", { intent: "create", name: "gradebook sync" })).text();
    const token = /fcl_[A-Za-z0-9_-]+/.exec(page)![0];

    const anon = new Client(server.url);
    const me = await anon.request("/api/v1/me", bearer(token));
    expect(me.status).toBe(200);
    expect(await me.json()).toMatchObject({ displayName: DEMO_SCHOOL.teachers[0].displayName, role: "teacher" });
    // Pages keep to the session cookie: a token is no way into the browser side.
    expect((await anon.request("/teach", bearer(token))).status).toBe(302);

    const list = await (await teacher.get("/settings/tokens")).text();
    expect(list).toContain("gradebook sync");
    expect(list).not.toContain(token);
    const id = /name="id" value="([^"]+)"/.exec(list)![1]!;
    await teacher.post("/settings/tokens", { intent: "revoke", id });
    expect((await anon.request("/api/v1/me", bearer(token))).status).toBe(401);
  });

  it("refuses a made-up token and an empty name", async () => {
    expect((await new Client(server.url).request("/api/v1/me", bearer("fcl_madeup"))).status).toBe(401);
    const teacher = new Client(server.url);
    await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[1].email, password: DEMO_PASSWORD });
    expect(await (await teacher.post("/settings/tokens", { intent: "create", name: "  " })).text()).toContain("Name the token");
  });

  it("is for teachers and admins only", async () => {
    const student = new Client(server.url);
    await student.post("/signin", { email: DEMO_SCHOOL.studentWithSignIn.email, password: DEMO_PASSWORD });
    expect((await student.get("/settings/tokens")).status).toBe(403);
  });
});
