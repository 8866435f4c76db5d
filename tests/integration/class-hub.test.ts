// The class hub against a constructed class: rounds and answers written straight into the database, so the
// figures behind "ready for the next step" are known exactly.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { classes, users } from "~/db/schema";
import { noteName } from "~/review/format";
import { playedRound, quick, type Play } from "../constructed-class";
import { Client, startStudio, startTestServer, type TestServer } from "./harness";

const PASSWORD = "class hub studio 2026";
let server: TestServer;
let teacher: Client;
let classId: string;
const ids: Record<string, string> = {};
let drilled = "";
const db = () => server.services.db;

beforeAll(async () => {
  server = await startTestServer();
  const email = "hana@class-hub.example";
  teacher = await startStudio(server, { studioName: "Class Hub Studio", displayName: "Hana Ostrova", email, password: PASSWORD });
  const [me] = await db().select({ id: users.id, orgId: users.orgId }).from(users).where(eq(users.email, email));
  expect((await teacher.post("/admin", { intent: "createClass", name: "Wednesday Readers", teacherId: me!.id })).status).toBe(200);
  [{ id: classId }] = (await db().select({ id: classes.id }).from(classes).where(eq(classes.orgId, me!.orgId))) as [{ id: string }];
  for (const name of ["Ada", "Bo", "Cy", "Di", "Ed"]) {
    expect((await teacher.post(`/teach/classes/${classId}`, { intent: "add", name, email: "" })).status).toBe(200);
    const [row] = await db().select({ id: users.id }).from(users).where(eq(users.displayName, name));
    ids[name] = row!.id;
  }
  const by = (plays: Record<string, Play>) => Object.fromEntries(Object.entries(plays).map(([name, play]) => [name, { userId: ids[name]!, play }]));
  const round = { orgId: me!.orgId, hostId: me!.id, classId };
  // Ed misses every third note by an octave: about 67 % home spots.
  const config = await playedRound(db(), { ...round, n: 1 }, by({ Ada: quick, Bo: quick, Cy: quick, Di: quick, Ed: (i) => ({ home: i % 3 !== 0, ms: 2_500 }) }));
  expect(config.prompts.length).toBeGreaterThanOrEqual(10);
  // An earlier drill of one note, which Ed misreads every time: his stuck note.
  const drill = await playedRound(db(), { ...round, n: 0, title: "Drill · one note", oneNote: true }, by({ Ada: quick, Ed: () => ({ home: false, ms: 3_000 }) }));
  drilled = noteName(drill.prompts[0]!.written);
}, 60_000);
afterAll(() => server?.close());

const hub = async () => {
  const html = await (await teacher.get(`/teach/classes/${classId}`)).text();
  return html.slice(html.indexOf('data-testid="class-ready"'), html.indexOf("Each student at the current step"));
};

describe("the class hub", () => {
  it("says the class is ready when 4 of 5 read the step well, and hosts the next step in one click", async () => {
    const line = await hub();
    expect(line).toContain("Current step: step 1, Naturals in fifth position");
    expect(line).toContain("4 of 5 students read it well");
    expect(line).toContain("Ready for the next step");
    expect(line).toContain("The rule: the class is ready when at least 80 % of its students");
    expect(line).toContain('name="set" value="ready-g-major-5"');
    const page = await (await teacher.get(`/teach/classes/${classId}`)).text();
    const row = (name: string) => page.slice(page.indexOf(`>${name}</a>`), page.indexOf("</tr>", page.indexOf(`>${name}</a>`)));
    expect(row("Ed")).toContain("Working on it");
    expect(row("Ed")).toContain(drilled);
    expect(row("Ada")).toContain("Reads it");
    expect(row("Ada")).toContain("None");
    const hosted = await teacher.post("/host", { intent: "set", set: "ready-g-major-5", classId });
    expect(hosted.status).toBe(302);
    expect(hosted.headers.get("location")).toMatch(/^\/stage\//);
  });

  it("is not ready once a sixth student who hasn't played joins (4 of 6 is under 80 %)", async () => {
    expect((await teacher.post(`/teach/classes/${classId}`, { intent: "add", name: "Fy", email: "" })).status).toBe(200);
    const line = await hub();
    expect(line).toContain("4 of 6 students read it well");
    expect(line).toContain("(5 needed)");
    expect(line).toContain("Not ready for the next step yet");
    expect(line).not.toContain('value="ready-g-major-5"');
  });
});
