import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashPassword } from "~/auth/password.server";
import { createApiToken } from "~/auth/tokens.server";
import { readingSets, rooms, spotMaps, organisations, users } from "~/db/schema";
import { demoEditedMap } from "~/demo/reading";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import type { RoomConfig } from "~/game/roomConfig";
import { defaultSpotMap, homeSpotFor, validateSpotMap } from "~/music/positions";
import { TUNINGS } from "~/music/tuning";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

let server: TestServer;
const OTHER = { org: "other-school", email: "teacher@other-school.example" };
beforeAll(async () => {
  server = await startTestServer();
  const { db } = server.services;
  await seedDemo(db);
  await db.delete(organisations).where(eq(organisations.id, OTHER.org));
  await db.insert(organisations).values({ id: OTHER.org, name: "Elsewhere Strings" });
  await db.insert(users).values({ id: "other-teacher", orgId: OTHER.org, role: "teacher", displayName: "Ansel Rooke", email: OTHER.email, passwordHash: await hashPassword(DEMO_PASSWORD) });
});
afterAll(() => server.close());

const signIn = async (email: string) => {
  const client = new Client(server.url);
  const res = await client.post("/signin", { email, password: DEMO_PASSWORD });
  expect(res.status).toBe(302);
  return client;
};
// Messages reach the page HTML-escaped.
const html = (text: string) => text.replace(/&/g, "&amp;").replace(/'/g, "&#x27;").replace(/"/g, "&quot;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
const rafe = DEMO_SCHOOL.teachers[0].email;

describe("reading sets and home-spot maps: route × role → status", () => {
  const roles = {
    anonymous: undefined,
    student: DEMO_SCHOOL.studentWithSignIn.email,
    teacher: rafe,
    otherSchool: OTHER.email,
    admin: DEMO_SCHOOL.admin.email,
  } as const;
  type R = keyof typeof roles;
  // 302 = sent to sign in; 403 = the school's but not theirs; 404 = not in their school (no hint that it exists).
  const table: [string, Record<R, number>][] = [
    ["/teach/sets", { anonymous: 302, student: 403, teacher: 200, otherSchool: 200, admin: 200 }],
    ["/teach/sets/new", { anonymous: 302, student: 403, teacher: 200, otherSchool: 200, admin: 200 }],
    ["/teach/sets/demo-set-tue-1", { anonymous: 302, student: 403, teacher: 200, otherSchool: 404, admin: 200 }],
    ["/teach/sets/demo-set-sat-1", { anonymous: 302, student: 403, teacher: 403, otherSchool: 404, admin: 200 }],
    ["/teach/sets/demo-set-school", { anonymous: 302, student: 403, teacher: 200, otherSchool: 404, admin: 200 }],
    ["/teach/classes/demo-class-tue/maps?position=5&tuning=standard", { anonymous: 302, student: 403, teacher: 200, otherSchool: 404, admin: 200 }],
    ["/teach/classes/demo-class-sat/maps", { anonymous: 302, student: 403, teacher: 403, otherSchool: 404, admin: 200 }],
    ["/api/v1/reading-sets", { anonymous: 401, student: 403, teacher: 200, otherSchool: 200, admin: 200 }],
    ["/api/v1/reading-sets/demo-set-tue-1", { anonymous: 401, student: 403, teacher: 200, otherSchool: 404, admin: 200 }],
    ["/api/v1/reading-sets/demo-set-sat-1", { anonymous: 401, student: 403, teacher: 403, otherSchool: 404, admin: 200 }],
    ["/api/v1/reading-sets/ready-naturals-5", { anonymous: 401, student: 403, teacher: 200, otherSchool: 200, admin: 200 }],
  ];
  const clients: Partial<Record<R, Client>> = {};
  beforeAll(async () => {
    for (const [role, email] of Object.entries(roles) as [R, string | undefined][]) clients[role] = email ? await signIn(email) : new Client(server.url);
  });
  for (const [path, expected] of table) {
    for (const role of Object.keys(roles) as R[]) {
      it(`${path} as ${role} → ${expected[role]}`, async () => {
        expect((await clients[role]!.get(path)).status).toBe(expected[role]);
      });
    }
  }

  it("the API lists only the caller's school's sets, plus the ready-made ones", async () => {
    const mine = await (await clients.teacher!.get("/api/v1/reading-sets")).json();
    expect(mine.sets.map((s: { id: string }) => s.id).sort()).toEqual(["demo-set-school", "demo-set-thu-1", "demo-set-thu-2", "demo-set-tue-1", "demo-set-tue-2"]);
    expect(mine.presets).toHaveLength(6);
    const other = await (await clients.otherSchool!.get("/api/v1/reading-sets")).json();
    expect(other.sets).toEqual([]);
    expect(other.presets).toHaveLength(6);
  });

  it("answers a personal API token like the cookie", async () => {
    const { token } = await createApiToken(server.services.db, DEMO_SCHOOL.teachers[0].id, "sets test");
    const res = await new Client(server.url).request("/api/v1/reading-sets/demo-set-tue-1", { headers: { Authorization: `Bearer ${token}` } });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ kind: "saved", name: "Week 1: naturals, top three strings", spec: { strings: [1, 2, 3] } });
  });
});

const GOOD = {
  name: "Week 3: G major, top strings",
  classId: "demo-class-tue",
  mode: "sprint",
  position: "5",
  tuning: "standard",
  frets: "15",
  lowest: "",
  highest: "",
  keyFifths: "1",
  accidentals: "key",
  homeOnly: "on",
  prompts: "12",
  seconds: "10",
};
const post = (client: Client, path: string, fields: Record<string, string | string[]>) => {
  const body = new URLSearchParams();
  for (const [k, v] of Object.entries(fields)) for (const one of [v].flat()) body.append(k, one);
  return client.request(path, { method: "POST", body });
};
const setCount = async () => (await server.services.db.select().from(readingSets)).length;

describe("creating and editing a reading set", () => {
  it("saves a good set with its strings, filed under the class", async () => {
    const client = await signIn(rafe);
    const res = await post(client, "/teach/sets/new", { ...GOOD, strings: ["", "1", "2", "3"] });
    expect(res.status).toBe(302);
    const id = new URL(res.headers.get("location")!, server.url).searchParams.get("set")!;
    const [row] = await server.services.db.select().from(readingSets).where(eq(readingSets.id, id));
    expect(row).toMatchObject({ name: GOOD.name, classId: "demo-class-tue", spec: { keyFifths: 1, accidentals: "key", strings: [1, 2, 3], ledgerLines: false } });
  });

  it.each([
    [{ name: "" }, "Give the set a name."],
    [{ strings: ["", "1"], lowest: "C4", highest: "D4" }, "No notes fit this reading set"],
    [{ lowest: "Q9" }, "Lowest note:"],
    [{ seconds: "1" }, "At least 3 seconds."],
    [{ classId: "demo-class-sat" }, "You don't teach that class."],
  ])("refuses %o with a clear message and stores nothing", async (override, message) => {
    const client = await signIn(rafe);
    const before = await setCount();
    const res = await post(client, "/teach/sets/new", { ...GOOD, ...override });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain(html(message));
    expect(await setCount()).toBe(before);
  });

  it("refuses a bad edit and leaves the set as it was", async () => {
    const client = await signIn(rafe);
    const [before] = await server.services.db.select().from(readingSets).where(eq(readingSets.id, "demo-set-tue-2"));
    const res = await post(client, "/teach/sets/demo-set-tue-2", { ...GOOD, prompts: "500" });
    expect(await res.text()).toContain("At most 60 notes.");
    const [after] = await server.services.db.select().from(readingSets).where(eq(readingSets.id, "demo-set-tue-2"));
    expect(after).toEqual(before);
  });

  it("copies a ready-made set into a class, and deletes only sets the teacher may see", async () => {
    const client = await signIn(rafe);
    const copy = await post(client, "/teach/sets", { intent: "copy", id: "ready-f-major-5", classId: "demo-class-thu" });
    expect(copy.status).toBe(302);
    const id = copy.headers.get("location")!.split("/").pop()!;
    const [row] = await server.services.db.select().from(readingSets).where(eq(readingSets.id, id));
    expect(row).toMatchObject({ name: "One flat: F major", classId: "demo-class-thu", spec: { keyFifths: -1 } });
    expect((await post(client, "/teach/sets", { intent: "delete", id: "demo-set-sat-2" })).status).toBe(403);
    expect((await post(client, "/teach/sets", { intent: "delete", id })).status).toBe(302);
    expect(await server.services.db.select().from(readingSets).where(eq(readingSets.id, id))).toEqual([]);
  });
});

describe("home-spot maps", () => {
  const path = "/teach/classes/demo-class-thu/maps?position=5&tuning=standard";
  const stored = () =>
    server.services.db.select().from(spotMaps).where(and(eq(spotMaps.classId, "demo-class-thu"), eq(spotMaps.position, 5)));

  it("refuses an invalid map with the engine's messages and stores nothing", async () => {
    const client = await signIn(rafe);
    const map = defaultSpotMap(5, TUNINGS.standard);
    // C5 moved to a spot that plays another pitch, and A4 moved out of the position.
    const spots = map.spots.map((s) => (s.written === "C5" ? { ...s, string: 2, fret: 7 } : s.written === "A4" ? { ...s, string: 4, fret: 14 } : s));
    const problems = validateSpotMap({ ...map, spots }, TUNINGS.standard);
    expect(problems.length).toBeGreaterThanOrEqual(2);
    const res = await client.post(path, { intent: "save", spots: JSON.stringify(spots) });
    expect(res.status).toBe(200);
    const page = await res.text();
    expect(page).toContain("Not saved; nothing changed.");
    for (const p of problems) expect(page).toContain(html(p.message));
    expect(await stored()).toEqual([]);
    const garbled = await client.post(path, { intent: "save", spots: "not json" });
    expect(await garbled.text()).toContain("The map didn&#x27;t arrive whole");
    expect(await stored()).toEqual([]);
  });

  it("saves a valid edited map and resets it", async () => {
    const client = await signIn(rafe);
    const res = await client.post(path, { intent: "save", spots: JSON.stringify(demoEditedMap().spots) });
    expect(res.status).toBe(302);
    const [row] = await stored();
    expect(homeSpotFor(row!.map as never, 71)).toMatchObject({ string: 4, fret: 9 });
    expect((await client.post(path, { intent: "reset" })).status).toBe(302);
    expect(await stored()).toEqual([]);
  });
});

describe("hosting from reading sets", () => {
  const roomOf = async (location: string | null) => {
    const id = location!.replace("/stage/", "");
    const [room] = await server.services.db.select().from(rooms).where(eq(rooms.id, id));
    return room!;
  };

  it("a room for a class uses the class's home-spot map", async () => {
    const client = await signIn(rafe);
    // A narrow range (A4 to C5) makes sure the drawn prompts include B4, the note the demo class moved.
    const res = await client.post("/host", { ...GOOD, lowest: "A4", highest: "C5", accidentals: "naturals", keyFifths: "0", prompts: "30", classId: "demo-class-tue" });
    expect(res.status).toBe(302);
    const config = (await roomOf(res.headers.get("location"))).config as RoomConfig;
    const b4 = config.prompts.filter((p) => p.written === "B4");
    expect(b4.length).toBeGreaterThan(0);
    for (const p of b4) expect(p.home).toMatchObject({ string: 4, fret: 9 });
    const elsewhere = await client.post("/host", { ...GOOD, lowest: "A4", highest: "C5", accidentals: "naturals", keyFifths: "0", prompts: "30", classId: "demo-class-thu" });
    for (const p of ((await roomOf(elsewhere.headers.get("location"))).config as RoomConfig).prompts.filter((p) => p.written === "B4")) {
      expect(p.home).toMatchObject({ string: 3, fret: 4 });
    }
  });

  it("hosts a saved set in one click and hosts it again with a new draw", async () => {
    const client = await signIn(rafe);
    const res = await client.post("/host", { intent: "set", set: "demo-set-tue-2", classId: "demo-class-tue" });
    expect(res.status).toBe(302);
    const first = await roomOf(res.headers.get("location"));
    expect(first).toMatchObject({ readingSetId: "demo-set-tue-2", classId: "demo-class-tue", title: "Tuesday Beginners · Week 2: all six strings · Sprint · naturals · position 5" });
    expect((first.config as RoomConfig).prompts).toHaveLength(15);

    const again = await client.post("/host", { intent: "again", roomId: first.id });
    expect(again.status).toBe(302);
    const second = await roomOf(again.headers.get("location"));
    expect(second.id).not.toBe(first.id);
    expect(second).toMatchObject({ readingSetId: "demo-set-tue-2", classId: "demo-class-tue", title: first.title });
    expect((second.config as RoomConfig).prompts).toHaveLength(15);
    expect((await client.get(`/results/${first.id}`)).status).toBe(200);
    expect(await (await client.get(`/results/${first.id}`)).text()).toContain("Host this again");
  });

  it("hosts a ready-made set, and refuses a set from another class or school", async () => {
    const client = await signIn(rafe);
    const res = await client.post("/host", { intent: "set", set: "ready-g-major-5", classId: "" });
    expect((await roomOf(res.headers.get("location"))).title).toBe("One sharp: G major · Sprint · G major · position 5");
    expect((await client.post("/host", { intent: "set", set: "demo-set-sat-1", classId: "" })).status).toBe(403);
    const notMine = await (await signIn(OTHER.email)).post("/host", { intent: "again", roomId: (await roomOf(res.headers.get("location"))).id });
    expect(notMine.status).toBe(404);
  });
});
