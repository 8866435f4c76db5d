// Sign-in cards (docs/decisions/0008-sign-in-cards.md) over real HTTP: a teacher issues cards for
// nickname-only students, a phone signs in by the card's link or by typing its codes, wrong codes are
// refused alike and rate-limited, re-issuing voids the old card and its devices, the teacher ends a
// device, and a teacher of another school can neither print nor see the cards.
import { and, eq } from "drizzle-orm";
import { nanoid } from "nanoid";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { classes, roomPlayers, rooms, signInCards, users, userSessions } from "~/db/schema";
import { newRoomCode } from "~/game/roomCode";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { Client, startStudio, startTestServer, type TestServer } from "./harness";
import { ScriptedSocket, testRoomConfig } from "../../server/scripted-rooms";

const PASSWORD = "cards-test-password";
const PHONE = "Mozilla/5.0 (Linux; Android 14; Pixel 8) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Mobile Safari/537.36";
const TABLET = "Mozilla/5.0 (iPad; CPU OS 17_5 like Mac OS X) AppleWebKit/605.1.15 (KHTML, like Gecko) Version/17.5 Mobile/15E148 Safari/604.1";
const STUDENTS = ["Juno P.", "Kit R.", "Wren S."] as const;

let server: TestServer;
let teacher: Client;
let other: Client;
let classId: string;
let classCode: string;
let orgId: string;
let teacherId: string;
const ids: Record<string, string> = {};
const db = () => server.services.db;

// Each caller gets its own documentation-range address, so one test's failures never limit another's.
let addresses = 0;
const newAddress = () => `198.51.100.${++addresses}`;
/** A phone: its own address and a phone browser's User-Agent. */
const phone = (address = newAddress(), userAgent = PHONE) => {
  const client = new Client(server.url);
  const headers = { "User-Agent": userAgent, "X-Forwarded-For": address };
  return {
    client,
    get: (path: string) => client.request(path, { headers }),
    post: (path: string, fields: Record<string, string>) => client.request(path, { method: "POST", headers, body: new URLSearchParams(fields) }),
  };
};

interface PrintedCard {
  path: string;
  code: string;
}

/** Issues cards for the named students through the print page and reads them off the sheet. */
async function printCards(names: readonly string[]): Promise<Record<string, PrintedCard>> {
  const body = new URLSearchParams(names.map((n) => ["student", ids[n]!]));
  const res = await teacher.request(`/teach/classes/${classId}/cards/print`, { method: "POST", body });
  expect(res.status).toBe(200);
  const html = await res.text();
  const cards = [...html.matchAll(/<article[^>]*data-card-url="([^"]+)"[\s\S]*?<h2[^>]*>([^<]+)<\/h2>[\s\S]*?data-personal-code="[^"]*">([A-Z0-9-]+)</g)];
  expect(cards.map((c) => c[2])).toEqual([...names].sort());
  return Object.fromEntries(cards.map(([, url, name, code]) => [name!, { path: new URL(url!).pathname, code: code! }]));
}

const me = async (client: Client) => {
  const res = await client.get("/api/v1/me");
  return res.status === 200 ? ((await res.json()) as { id: string; displayName: string }) : res.status;
};

beforeAll(async () => {
  server = await startTestServer({ TRUST_PROXY: "loopback" });
  const email = "wilma@cards-studio.example";
  teacher = await startStudio(server, { studioName: "Cards Studio", displayName: "Wilma Tenterden", email, password: PASSWORD });
  [{ id: teacherId, orgId }] = await db().select({ id: users.id, orgId: users.orgId }).from(users).where(eq(users.email, email)) as [{ id: string; orgId: string }];
  expect((await teacher.post("/admin", { intent: "createClass", name: "Thursday Starters", teacherId: "" })).status).toBe(200);
  const [cls] = await db().select().from(classes).where(eq(classes.orgId, orgId));
  classId = cls!.id;
  classCode = cls!.joinCode;
  for (const name of STUDENTS) {
    expect((await teacher.post(`/teach/classes/${classId}`, { intent: "add", name, email: "" })).status).toBe(200);
    const [row] = await db().select({ id: users.id }).from(users).where(and(eq(users.displayName, name), eq(users.orgId, orgId)));
    ids[name] = row!.id;
  }
  other = await startStudio(server, { studioName: "Elsewhere Studio", displayName: "Otto Brand", email: "otto@elsewhere.example", password: PASSWORD });
}, 60_000);
afterAll(() => server?.close());

describe("sign-in cards", () => {
  it("prints a card per ticked student, and the roster and cards page show who has one", async () => {
    const printed = await printCards(STUDENTS);
    const stored = await db().select().from(signInCards);
    expect(stored).toHaveLength(3);
    // Only hashes are kept: neither the link's token nor the personal code is in any row.
    const rows = JSON.stringify(stored);
    for (const card of Object.values(printed)) {
      expect(rows).not.toContain(card.path.split("/").pop());
      expect(rows).not.toContain(card.code.replace("-", ""));
    }
    const roster = await (await teacher.get(`/teach/classes/${classId}`)).text();
    expect(roster.match(/Sign-in card<\/span>/g)).toHaveLength(3);
    expect(await (await teacher.get(`/teach/classes/${classId}/cards`)).text()).toContain("Issued");
  });

  it("signs a student in by the card's link: the link asks, the post signs in with a long device session", async () => {
    const Juno = (await printCards(["Juno P."]))["Juno P."]!;
    const device = phone();
    const asked = await device.get(Juno.path);
    expect(asked.status).toBe(200);
    expect(asked.headers.get("cache-control")).toContain("no-store");
    expect(await asked.text()).toContain("Sign in as Juno P.");
    expect(await me(device.client)).toBe(401);
    const signed = await device.post(Juno.path, {});
    expect(signed.status).toBe(302);
    expect(signed.headers.get("location")).toBe("/me");
    expect(signed.headers.get("set-cookie")).toMatch(/Max-Age=15552000/);
    expect(await me(device.client)).toMatchObject({ id: ids["Juno P."], displayName: "Juno P." });
    expect((await device.get("/me")).status).toBe(200);
    const [session] = await db().select().from(userSessions).where(eq(userSessions.userId, ids["Juno P."]!));
    expect(session!.cardId).not.toBeNull();
    expect(session!.device).toBe("Chrome on Android");
    expect(session!.expiresAt.getTime() - session!.createdAt.getTime()).toBe(180 * 86_400_000);
    expect(session!.idleExpiresAt.getTime() - session!.createdAt.getTime()).toBe(60 * 86_400_000);
  });

  it("signs a student in by the class code and personal code typed on the sign-in page, however they are typed", async () => {
    const { code } = (await printCards(["Kit R."]))["Kit R."]!;
    const device = phone();
    const res = await device.post("/signin", { intent: "card", classCode: classCode.toLowerCase().replace("-", " "), personalCode: code.replace("-", "").toLowerCase() });
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/me");
    expect(await me(device.client)).toMatchObject({ id: ids["Kit R."] });
  });

  it("answers a wrong personal code and an unknown class code with the same sentence, and signs nobody in", async () => {
    const { code } = (await printCards(["Kit R."]))["Kit R."]!;
    const device = phone();
    const wrongCode = await device.post("/signin", { intent: "card", classCode, personalCode: "HXRM-7TCK" });
    const wrongClass = await device.post("/signin", { intent: "card", classCode: "WXYZ-9999", personalCode: code });
    expect([wrongCode.status, wrongClass.status]).toEqual([200, 200]);
    const sentence = (html: string) => html.match(/Those codes don[^<]*/)?.[0];
    const [a, b] = [sentence(await wrongCode.text()), sentence(await wrongClass.text())];
    expect(a).toContain("match a sign-in card");
    expect(b).toBe(a);
    expect(await me(device.client)).toBe(401);
    // Nothing typed at all is a clear error too, never a 500.
    expect(await (await device.post("/signin", { intent: "card", classCode: "", personalCode: "" })).text()).toContain("Enter your class");
  });

  it("limits wrong codes per class code and address; the right code still works from elsewhere", async () => {
    const { code } = (await printCards(["Wren S."]))["Wren S."]!;
    const address = newAddress();
    const guesser = phone(address);
    for (let i = 0; i < 10; i++) {
      expect((await guesser.post("/signin", { intent: "card", classCode, personalCode: `TTTT-TTT${i}` })).status).toBe(200);
    }
    const refused = await guesser.post("/signin", { intent: "card", classCode, personalCode: code });
    expect(refused.status).toBe(429);
    expect(Number(refused.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(await refused.text()).toContain("Too many wrong codes for this class from here");
    expect(await me(guesser.client)).toBe(401);
    const owner = phone();
    expect((await owner.post("/signin", { intent: "card", classCode, personalCode: code })).status).toBe(302);
  });

  it("refuses card links from an address that tried 100 links that open nothing, and only from there", async () => {
    const card = (await printCards(["Wren S."]))["Wren S."]!;
    const scanner = phone();
    for (let i = 0; i < 100; i++) expect((await scanner.get(`/card/made-up-link-${i}`)).status).toBe(404);
    const refused = await scanner.get(card.path);
    expect(refused.status).toBe(429);
    expect(refused.headers.get("retry-after")).toBeTruthy();
    expect(await refused.text()).toContain("Too many wrong sign-in card codes from this network");
    expect((await scanner.post(card.path, {})).status).toBe(429);
    expect(await me(scanner.client)).toBe(401);
    expect((await phone().post(card.path, {})).status).toBe(302);
  });

  it("re-issuing a card voids the old card and signs out the devices it opened", async () => {
    const old = (await printCards(["Juno P."]))["Juno P."]!;
    const byLink = phone();
    const byCode = phone();
    expect((await byLink.post(old.path, {})).status).toBe(302);
    expect((await byCode.post("/signin", { intent: "card", classCode, personalCode: old.code })).status).toBe(302);
    const fresh = (await printCards(["Juno P."]))["Juno P."]!;
    expect(await me(byLink.client)).toBe(401);
    expect(await me(byCode.client)).toBe(401);
    const stale = await phone().get(old.path);
    expect(stale.status).toBe(404);
    expect(await stale.text()).toContain("no longer works");
    expect((await phone().post(old.path, {})).status).toBe(404);
    expect((await phone().post("/signin", { intent: "card", classCode, personalCode: old.code })).status).toBe(200);
    expect((await phone().post("/signin", { intent: "card", classCode, personalCode: fresh.code })).status).toBe(302);
  });

  it("the teacher sees each device by name and last use, and ending one signs it out", async () => {
    const card = (await printCards(["Wren S."]))["Wren S."]!;
    const kept = phone();
    const ended = phone(newAddress(), TABLET);
    expect((await kept.post(card.path, {})).status).toBe(302);
    expect((await ended.post(card.path, {})).status).toBe(302);
    const page = await (await teacher.get(`/teach/classes/${classId}/cards`)).text();
    expect(page).toContain("Chrome on Android");
    expect(page).toContain("Safari on iPad");
    expect(page).toContain("last used");
    const sessions = await db().select().from(userSessions).where(eq(userSessions.userId, ids["Wren S."]!));
    expect(sessions).toHaveLength(2);
    const endedRow = sessions.find((s) => s.device === "Safari on iPad")!;
    const res = await teacher.post(`/teach/classes/${classId}/cards`, { intent: "end", id: endedRow.id });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("That device is signed out");
    expect(await me(ended.client)).toBe(401);
    expect(await me(kept.client)).toMatchObject({ id: ids["Wren S."] });
    // A session that isn't a card device of this class is not the teacher's to end.
    const [own] = await db().select().from(userSessions).where(eq(userSessions.userId, teacherId));
    expect(await (await teacher.post(`/teach/classes/${classId}/cards`, { intent: "end", id: own!.id })).text()).toContain("already signed out");
    expect(await me(teacher)).toMatchObject({ id: teacherId });
  });

  it("a card-signed student practises, sees their assignment and is followed into a live round", async () => {
    const card = (await printCards(["Kit R."]))["Kit R."]!;
    const device = phone();
    expect((await device.post(card.path, {})).status).toBe(302);
    const due = new Date(Date.now() + 3 * 86_400_000).toISOString().slice(0, 16);
    const set = await teacher.post(`/teach/classes/${classId}/assignments/new`, {
      material: "preset:ready-naturals-5", title: "Card homework", audience: "class", goalNotes: "20", goalAccuracy: "80", goalSeconds: "", due, tzOffset: "0",
    });
    expect(set.status).toBe(302);
    const mine = (await (await device.client.get("/api/v1/me/assignments")).json()) as { assignments: { id: string; title: string }[] };
    const assignment = mine.assignments.find((a) => a.title === "Card homework")!;
    expect(assignment).toBeDefined();
    const answer = { clientId: "card-practice-00000001", source: "preset:ready-naturals-5", position: 5, tuning: "standard", keyFifths: 0, written: "C5", string: 3, fret: 5, reactionMs: 1400, at: Date.now(), classId, assignmentId: assignment.id };
    const stored = await device.client.request("/api/v1/practice/answers", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify({ answers: [answer] }) });
    expect(stored.status).toBe(200);
    expect(await stored.json()).toMatchObject({ stored: 1, results: [{ kind: "home-spot" }] });

    const code = newRoomCode();
    const roomId = nanoid();
    const config = testRoomConfig(code);
    await db().insert(rooms).values({ id: roomId, code, orgId, hostUserId: teacherId, classId, title: "Card round", mode: config.mode, position: 5, config });
    const pad = await ScriptedSocket.open(server.url, server.url, { Cookie: device.client.cookieHeader() });
    pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
    await pad.next("welcome");
    pad.send({ type: "join", room: code, nickname: "Kit on the pad" });
    const { you } = await pad.next("welcome", (m) => m.you !== null);
    pad.ws.close();
    const [seat] = await db().select().from(roomPlayers).where(eq(roomPlayers.id, you!.playerId));
    expect(seat).toMatchObject({ userId: ids["Kit R."], nickname: "Kit R." });
  });

  it("a teacher of another school can neither print nor see the cards, nor end a device", async () => {
    const before = await db().select().from(signInCards);
    expect((await other.get(`/teach/classes/${classId}/cards`)).status).toBe(404);
    const print = await other.request(`/teach/classes/${classId}/cards/print`, { method: "POST", body: new URLSearchParams([["student", ids["Juno P."]!]]) });
    expect(print.status).toBe(404);
    const body = await print.text();
    expect(body).not.toContain("Juno");
    expect(body).not.toContain("data-personal-code");
    const [session] = await db().select().from(userSessions).where(eq(userSessions.userId, ids["Kit R."]!));
    expect((await other.post(`/teach/classes/${classId}/cards`, { intent: "end", id: session!.id })).status).toBe(404);
    expect(await db().select().from(signInCards)).toEqual(before);
    expect(await db().select().from(userSessions).where(eq(userSessions.id, session!.id))).toHaveLength(1);
  });

  it("the student's data export names the card by its date only, and deleting the student deletes the card and its devices", async () => {
    const card = (await printCards(["Wren S."]))["Wren S."]!;
    const device = phone();
    expect((await device.post(card.path, {})).status).toBe(302);
    const exported = await (await teacher.get(`/people/${ids["Wren S."]}/export.json`)).text();
    expect(JSON.parse(exported).signInCard.issuedAt).toBeTruthy();
    expect(exported).not.toContain(card.path.split("/").pop());
    expect(exported).not.toContain(card.code.replace("-", ""));
    expect((await teacher.post(`/admin/students/${ids["Wren S."]}`, { confirmName: "Wren S." })).status).toBe(302);
    expect(await db().select().from(signInCards).where(eq(signInCards.userId, ids["Wren S."]!))).toEqual([]);
    expect(await me(device.client)).toBe(401);
    expect((await phone().get(card.path)).status).toBe(404);
  });
});
