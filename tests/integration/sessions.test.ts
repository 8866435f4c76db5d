// Server-side sessions: what ends them, how long they last, the devices and password pages, and the
// cookie's Secure flag. Each test signs up its own studio, so its sessions are its own.
import { eq } from "drizzle-orm";
import { createCookie } from "react-router";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { hashToken } from "~/auth/secret-token.server";
import { SESSION_COOKIE } from "~/auth/session.server";
import { roomPlayers, userSessions, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { Client, startStudio, startTestServer, type TestServer } from "./harness";
import { openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";

let server: TestServer;
beforeAll(async () => {
  // Each new studio comes from an address of its own (a documentation range, only ever a header),
  // so the sign-up limit per network does not cut the file short.
  server = await startTestServer({ TRUST_PROXY: "loopback" });
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const PASSWORD = "a long enough secret";
const PHONE = "Mozilla/5.0 (Linux; Android 14; Pixel 8) AppleWebKit/537.36 (KHTML, like Gecko) Chrome/126.0.0.0 Mobile Safari/537.36";
const LAPTOP = "Mozilla/5.0 (Macintosh; Intel Mac OS X 14.5; rv:127.0) Gecko/20100101 Firefox/127.0";

let studios = 0;
/** A new studio's admin, signed in once (as a laptop's Firefox). */
async function newAdmin() {
  const email = `admin-${++studios}-${Date.now()}@sessions.example`;
  const client = await startStudio(server, { studioName: "Session Studio", displayName: "Ines Harlow", email, password: PASSWORD }, { "User-Agent": LAPTOP, "X-Forwarded-For": `192.0.2.${studios}` });
  const [user] = await server.services.db.select({ id: users.id }).from(users).where(eq(users.email, email));
  return { client, email, userId: user!.id };
}

async function signIn(email: string, password = PASSWORD, userAgent = PHONE) {
  const client = new Client(server.url);
  const res = await client.request("/signin", { method: "POST", headers: { "User-Agent": userAgent }, body: new URLSearchParams({ email, password }) });
  expect(res.status).toBe(302);
  return client;
}

/** A second browser holding a copy of the first one's cookie. */
function copyOf(client: Client) {
  const copy = new Client(server.url);
  copy.setCookie(SESSION_COOKIE, new Map(client.cookieHeader().split("; ").map((p) => p.split("=") as [string, string])).get(SESSION_COOKIE)!);
  return copy;
}

const status = async (client: Client) => (await client.get("/api/v1/me")).status;
const rowsOf = (userId: string) => server.services.db.select().from(userSessions).where(eq(userSessions.userId, userId));

/** Asks for a reset link and waits for its mail (mail may leave after the answer). */
async function resetLink(email: string) {
  const before = (await server.mail()).filter((m) => m.to.includes(email)).length;
  await new Client(server.url).post("/forgot", { email });
  for (let i = 0; i < 50; i++) {
    const mails = (await server.mail()).filter((m) => m.to.includes(email));
    if (mails.length > before) {
      const newest = mails.sort((a, b) => a.receivedAt.localeCompare(b.receivedAt)).at(-1)!;
      return new URL(newest.text.match(/https?:\/\/\S+\/reset\/\S+/)![0]).pathname;
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no reset mail for ${email}`);
}

describe("the session cookie", () => {
  it("carries only a random id; the table keeps its hash, which opens nothing", async () => {
    const { client, userId } = await newAdmin();
    const raw = decodeURIComponent(new Map(client.cookieHeader().split("; ").map((p) => p.split("=") as [string, string])).get(SESSION_COOKIE)!);
    const id = JSON.parse(Buffer.from(raw.slice(0, raw.lastIndexOf(".")), "base64").toString("utf8")) as string;
    expect(id).toMatch(/^[\w-]{43}$/);
    expect(id).not.toContain(userId);
    const [row] = await rowsOf(userId);
    expect(row).toMatchObject({ tokenHash: hashToken(id), device: "Firefox on macOS" });
    expect(JSON.stringify(row)).not.toContain(id);

    // Someone with a copy of the database and even the cookie secret still can't make a working cookie.
    const forged = new Client(server.url);
    const cookie = createCookie(SESSION_COOKIE, { secrets: [server.services.env.SESSION_SECRET] });
    forged.setCookie(SESSION_COOKIE, (await cookie.serialize(row!.tokenHash)).split(";")[0]!.split("=")[1]!);
    expect(await status(forged)).toBe(401);
    expect(await status(client)).toBe(200);
  });

  it("is httpOnly, SameSite=Lax and not Secure while PUBLIC_URL is http (a laptop on the class Wi-Fi)", async () => {
    const res = await new Client(server.url).post("/signin", { email: DEMO_SCHOOL.admin.email, password: DEMO_PASSWORD });
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);
    expect(cookie).toMatch(/Max-Age=2592000/);
  });

  it("is Secure when a trusted proxy says the request came over https, though PUBLIC_URL is http", async () => {
    const client = new Client(server.url);
    const res = await client.request("/signin", {
      method: "POST",
      // What a browser sends through a TLS proxy: the https origin, and the proxy's word on the scheme.
      headers: { "X-Forwarded-Proto": "https", Origin: server.url.replace("http:", "https:") },
      body: new URLSearchParams({ email: DEMO_SCHOOL.admin.email, password: DEMO_PASSWORD }),
    });
    expect(res.status).toBe(302);
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
    expect(cookie).toMatch(/; Secure/i);
  });

  it("is Secure when PUBLIC_URL is https, and lives as long as SESSION_MAX_DAYS and SESSION_IDLE_DAYS say", async () => {
    const https = await startTestServer({ PUBLIC_URL: "https://fretcall.school.example", SESSION_MAX_DAYS: "2", SESSION_IDLE_DAYS: "0.5" });
    try {
      await seedDemo(https.services.db);
      const res = await new Client(https.url).post("/signin", { email: DEMO_SCHOOL.admin.email, password: DEMO_PASSWORD });
      const cookie = res.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
      expect(cookie).toMatch(/; Secure/i);
      expect(cookie).toMatch(/Max-Age=172800/);
      const [row] = await https.services.db.select().from(userSessions).where(eq(userSessions.userId, DEMO_SCHOOL.admin.id));
      expect(row!.expiresAt.getTime() - row!.createdAt.getTime()).toBe(2 * 86_400_000);
      expect(row!.idleExpiresAt.getTime() - row!.lastSeenAt.getTime()).toBe(43_200_000);
    } finally {
      await https.close();
    }
  });
});

describe("what ends a session", () => {
  it("signing out ends it on the server: a copied cookie stops working", async () => {
    const { client, userId } = await newAdmin();
    const copy = copyOf(client);
    expect(await status(copy)).toBe(200);
    expect((await client.post("/signout", {})).status).toBe(302);
    expect(await status(copy)).toBe(401);
    expect(await rowsOf(userId)).toEqual([]);
  });

  it("signing in again starts a new session instead of keeping the one the browser held", async () => {
    const { client, email, userId } = await newAdmin();
    const before = copyOf(client);
    await client.request("/signin", { method: "POST", body: new URLSearchParams({ email, password: PASSWORD }) });
    expect(await status(client)).toBe(200);
    expect(await status(before)).toBe(401);
    expect(await rowsOf(userId)).toHaveLength(1);
  });

  it("a password reset ends every session of the user and revokes their API tokens", async () => {
    const { client, email } = await newAdmin();
    const phone = await signIn(email);
    const page = await (await client.post("/settings/tokens", { intent: "create", name: "gradebook sync" })).text();
    const token = /fcl_[\w-]+/.exec(page)![0];
    const bearer = { headers: { Authorization: `Bearer ${token}` } };
    expect((await new Client(server.url).request("/api/v1/me", bearer)).status).toBe(200);

    const done = await new Client(server.url).post(await resetLink(email), { password: "a brand new password", confirm: "a brand new password" });
    expect(await done.text()).toContain("Your password is changed.");
    expect(await status(client)).toBe(401);
    expect(await status(phone)).toBe(401);
    expect((await new Client(server.url).request("/api/v1/me", bearer)).status).toBe(401);
    expect(await status(await signIn(email, "a brand new password"))).toBe(200);
  });

  it("using one reset link voids every other outstanding link of the user", async () => {
    const { email } = await newAdmin();
    const first = await resetLink(email);
    const second = await resetLink(email);
    expect(first).not.toBe(second);
    const visitor = new Client(server.url);
    expect(await (await visitor.post(second, { password: "the second new one", confirm: "the second new one" })).text()).toContain("Your password is changed.");
    expect(await (await visitor.get(first)).text()).toContain("expired or was already used");
    expect(await (await visitor.post(first, { password: "the first new one!", confirm: "the first new one!" })).text()).toContain("expired or was already used");
    expect(await status(await signIn(email, "the second new one"))).toBe(200);
  });
});

describe("changing the password", () => {
  it("refuses a wrong current password with a message and changes nothing", async () => {
    const { client, email } = await newAdmin();
    const phone = await signIn(email);
    const res = await client.post("/settings/password", { current: "not my password", password: "another long secret", confirm: "another long secret" });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("That isn&#x27;t your current password.");
    expect(await status(phone)).toBe(200);
    expect(await status(await signIn(email))).toBe(200);
  });

  it("checks the new password with the usual rules", async () => {
    const { client } = await newAdmin();
    const short = await client.post("/settings/password", { current: PASSWORD, password: "short", confirm: "short" });
    expect(await short.text()).toContain("Use at least 10 characters.");
    const differ = await client.post("/settings/password", { current: PASSWORD, password: "another long secret", confirm: "something else" });
    expect(await differ.text()).toContain("The two passwords differ.");
  });

  it("ends every other session but keeps this one, and lists the API tokens that stay valid", async () => {
    const { client, email } = await newAdmin();
    const phone = await signIn(email);
    const other = await signIn(email, PASSWORD, LAPTOP);
    await client.post("/settings/tokens", { intent: "create", name: "timetable export" });
    const page = await (await client.get("/settings/password")).text();
    expect(page).toContain("timetable export");
    expect(page).toContain("A new password does not stop these tokens");

    const res = await client.post("/settings/password", { current: PASSWORD, password: "another long secret", confirm: "another long secret" });
    expect(await res.text()).toContain("You were signed out on 2 other devices.");
    expect(await status(client)).toBe(200);
    expect(await status(phone)).toBe(401);
    expect(await status(other)).toBe(401);
    expect(await status(await signIn(email, "another long secret"))).toBe(200);

    // The tokens are listed with a revoke button that works there.
    const id = /name="id" value="([^"]+)"/.exec(await (await client.get("/settings/password")).text())![1]!;
    expect(await (await client.post("/settings/password", { intent: "revoke", id })).text()).toContain("The token is revoked.");
    expect(await (await client.get("/settings/password")).text()).not.toContain("timetable export");
  });
});

describe("signed-in devices", () => {
  it("lists the user's sessions and ends the one chosen: that cookie stops working", async () => {
    const { client, email, userId } = await newAdmin();
    const phone = await signIn(email);
    const page = await (await client.get("/settings/devices")).text();
    expect(page).toContain("Firefox on macOS");
    expect(page).toContain("Chrome on Android");
    expect(page.match(/this device/g)).toHaveLength(1);

    const phoneRow = (await rowsOf(userId)).find((r) => r.device === "Chrome on Android")!;
    const res = await client.post("/settings/devices", { intent: "end", id: phoneRow.id });
    expect(await res.text()).toContain("That device is signed out.");
    expect(await status(phone)).toBe(401);
    expect(await status(client)).toBe(200);
    expect(await (await client.get("/settings/devices")).text()).not.toContain("Chrome on Android");
  });

  it("ends no one else's session, and ending this device signs out here", async () => {
    const a = await newAdmin();
    const b = await newAdmin();
    const [bRow] = await rowsOf(b.userId);
    expect(await (await a.client.post("/settings/devices", { intent: "end", id: bRow!.id })).text()).toContain("already signed out");
    expect(await status(b.client)).toBe(200);

    const [aRow] = await rowsOf(a.userId);
    const out = await a.client.post("/settings/devices", { intent: "end", id: aRow!.id });
    expect(out.status).toBe(302);
    expect(out.headers.get("location")).toBe("/signin");
    expect(await status(a.client)).toBe(401);
  });

  it("signs out of every other device at once", async () => {
    const { client, email } = await newAdmin();
    const phone = await signIn(email);
    expect(await (await client.post("/settings/devices", { intent: "end-others" })).text()).toContain("Signed out of 1 other device.");
    expect(await status(phone)).toBe(401);
    expect(await status(client)).toBe(200);
  });

  it("are there for students too, without API tokens", async () => {
    const student = await signIn(DEMO_SCHOOL.studentWithSignIn.email, DEMO_PASSWORD);
    for (const path of ["/settings/devices", "/settings/password"]) {
      const res = await student.get(path);
      expect(res.status).toBe(200);
      expect(await res.text()).not.toContain("API tokens");
    }
    expect((await new Client(server.url).get("/settings/devices")).headers.get("location")).toBe("/signin?redirectTo=%2Fsettings%2Fdevices");
  });
});

describe("lifetimes on the server", () => {
  it("ends a session idle past its limit", async () => {
    const { client, userId } = await newAdmin();
    await server.services.db.update(userSessions).set({ idleExpiresAt: new Date(Date.now() - 1000) }).where(eq(userSessions.userId, userId));
    expect(await status(client)).toBe(401);
    expect(await rowsOf(userId)).toEqual([]);
  });

  it("ends a session past its absolute limit however active it is", async () => {
    const { client, userId } = await newAdmin();
    await server.services.db.update(userSessions).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(userSessions.userId, userId));
    expect(await status(client)).toBe(401);
    expect(await rowsOf(userId)).toEqual([]);
  });

  it("moves last-seen and the idle limit at most once a minute", async () => {
    const { client, userId } = await newAdmin();
    const [fresh] = await rowsOf(userId);
    expect(await status(client)).toBe(200);
    expect((await rowsOf(userId))[0]!.lastSeenAt).toEqual(fresh!.lastSeenAt);

    const twoMinutesAgo = new Date(Date.now() - 120_000);
    await server.services.db.update(userSessions).set({ lastSeenAt: twoMinutesAgo, idleExpiresAt: new Date(Date.now() + 1000) }).where(eq(userSessions.userId, userId));
    expect(await status(client)).toBe(200);
    const [touched] = await rowsOf(userId);
    expect(touched!.lastSeenAt.getTime()).toBeGreaterThan(twoMinutesAgo.getTime() + 60_000);
    expect(touched!.idleExpiresAt.getTime() - touched!.lastSeenAt.getTime()).toBe(7 * 86_400_000);
  });
});

describe("the live hub", () => {
  /** Joins a room from a pad that sends the given cookies; the account its seat is linked to. */
  async function seatOwner(cookie: string, code: string, nickname: string) {
    const pad = await ScriptedSocket.open(server.url, server.url, { Cookie: cookie });
    pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
    await pad.next("welcome");
    pad.send({ type: "join", room: code, nickname });
    const { you } = await pad.next("welcome", (m) => m.you !== null);
    pad.ws.close();
    const [seat] = await server.services.db.select({ userId: roomPlayers.userId }).from(roomPlayers).where(eq(roomPlayers.id, you!.playerId));
    return seat!.userId;
  }

  it("links a signed-in student's seat to the account, and not once that session has ended", async () => {
    const email = DEMO_SCHOOL.studentWithSignIn.email;
    const [student] = await server.services.db.select({ id: users.id }).from(users).where(eq(users.email, email));
    const client = await signIn(email, DEMO_PASSWORD);
    const copied = client.cookieHeader();
    const room = await openTestRoom(server.services.db);
    expect(await seatOwner(copied, room.code, "Amani")).toBe(student!.id);
    await client.post("/signout", {});
    expect(await seatOwner(copied, room.code, "Amani again")).toBeNull();
  });
});
