// A new studio's admin is its first teacher: they create a class they teach, host rounds for it, and the
// dashboard's first steps tick themselves from what the school has.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { classes, memberships, rooms, users } from "~/db/schema";
import { Client, startStudio, startTestServer, type TestServer } from "./harness";

const PASSWORD = "first-run studio 2026";
const EMAIL = "noor@first-run.example";
let server: TestServer;
let admin: Client;

beforeAll(async () => {
  server = await startTestServer();
  admin = await startStudio(server, { studioName: "First Run Studio", displayName: "Noor Ellery", email: EMAIL, password: PASSWORD });
}, 60_000);
afterAll(() => server?.close());

/** The steps the dashboard shows ticked, and those still to do (none at all once the list is gone). */
async function steps(path = "/teach") {
  const html = await (await admin.get(path)).text();
  const all = [...html.matchAll(/data-step="(\w+)" data-done="(true|false)"/g)];
  return { html, done: all.filter((m) => m[2] === "true").map((m) => m[1]), todo: all.filter((m) => m[2] === "false").map((m) => m[1]) };
}

describe("a new studio's admin", () => {
  it("teaches: hosting in the menu, first steps ticked one by one as the work is done", async () => {
    const [me] = await server.services.db.select({ id: users.id, orgId: users.orgId }).from(users).where(eq(users.email, EMAIL));
    const start = await steps();
    expect(start.todo).toEqual(["class", "students", "set", "round", "assignment"]);
    expect(start.html).toContain('href="/host"');
    expect(start.html).toContain("5 steps to go");
    expect(start.html).not.toContain("Your school's admin can add you");
    // The admin's own page shows the same list.
    expect((await steps("/admin")).todo).toHaveLength(5);

    // The create-class form offers the admin themself as the class's teacher.
    expect((await admin.post("/admin", { intent: "createClass", name: "Monday Starters", teacherId: me!.id })).status).toBe(200);
    const [cls] = await server.services.db.select().from(classes).where(eq(classes.orgId, me!.orgId));
    const [teaching] = await server.services.db.select().from(memberships).where(and(eq(memberships.classId, cls!.id), eq(memberships.userId, me!.id)));
    expect(teaching?.role).toBe("teacher");
    expect((await steps()).done).toEqual(["class"]);

    expect((await admin.post(`/teach/classes/${cls!.id}`, { intent: "add", name: "Pip Q.", email: "" })).status).toBe(200);
    const afterStudents = await steps();
    expect(afterStudents.done).toEqual(["class", "students"]);
    expect(afterStudents.html).toContain(`/teach/classes/${cls!.id}/assignments/new`);

    // Hosting a ready-made set for the class opens a stage the admin runs.
    const hosted = await admin.post("/host", { intent: "set", set: "ready-naturals-5", classId: cls!.id });
    expect(hosted.status).toBe(302);
    const stage = hosted.headers.get("location")!;
    expect(stage).toMatch(/^\/stage\//);
    expect((await admin.get(stage)).status).toBe(200);
    const [room] = await server.services.db.select().from(rooms).where(eq(rooms.orgId, me!.orgId));
    expect(room).toMatchObject({ hostUserId: me!.id, classId: cls!.id });
    const afterRound = await steps();
    expect(afterRound.done).toEqual(["class", "students", "round"]);
    expect(afterRound.html).toContain("2 steps to go");
  });
});
