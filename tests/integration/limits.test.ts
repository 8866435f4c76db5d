// Limits before any work: body sizes (413), rate limits (429 with Retry-After), no lock-out by
// strangers, TRUST_PROXY, the same-origin check, HSTS, and answers that don't reveal accounts.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import WebSocket from "ws";
import { hashPassword } from "~/auth/password.server";
import { createStudio } from "~/auth/users.server";
import { users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";
import { openTestRoom, ScriptedSocket } from "../../server/scripted-rooms";

// Behind a proxy on loopback: each test speaks from its own client address (X-Forwarded-For).
let server: TestServer;
let plain: TestServer;
beforeAll(async () => {
  server = await startTestServer({ TRUST_PROXY: "loopback" });
  await seedDemo(server.services.db);
  plain = await startTestServer();
  await seedDemo(plain.services.db);
  await createStudio(server.services.db, {
    studioName: "Elsewhere Strings",
    displayName: "Ottoline Fenn",
    email: "ottoline@elsewhere.example",
    passwordHash: await hashPassword("another long password"),
  });
});
afterAll(async () => {
  await server.close();
  await plain.close();
});

let nextAddress = 10;
/** A fresh client address for one test. */
const newAddress = () => `198.51.100.${nextAddress++}`;

const post = (base: string, path: string, fields: Record<string, string>, address?: string, headers: Record<string, string> = {}) =>
  new Client(base).request(path, {
    method: "POST",
    headers: { ...(address ? { "X-Forwarded-For": address } : {}), ...headers },
    body: new URLSearchParams(fields),
  });

async function signedIn(email: string, address: string) {
  const client = new Client(server.url);
  const res = await client.request("/signin", {
    method: "POST",
    headers: { "X-Forwarded-For": address },
    body: new URLSearchParams({ email, password: DEMO_PASSWORD }),
  });
  expect(res.status).toBe(302);
  return client;
}

/** A request body sent in chunks, without Content-Length. */
function chunked(total: number, chunk = 16 * 1024) {
  let sent = 0;
  return new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent >= total) return controller.close();
      const size = Math.min(chunk, total - sent);
      sent += size;
      controller.enqueue(new TextEncoder().encode("x".repeat(size)));
    },
  });
}

function expect429(res: Response, sentence: RegExp) {
  expect(res.status).toBe(429);
  expect(Number(res.headers.get("retry-after"))).toBeGreaterThan(0);
  return res.text().then((text) => expect(text.replace(/&#x27;/g, "'")).toMatch(sentence));
}

describe("body limits", () => {
  it("refuses an oversized form by its Content-Length with a page that states the limit", async () => {
    const res = await post(server.url, "/signin", { email: "a@b.example", password: "x".repeat(70 * 1024) });
    expect(res.status).toBe(413);
    expect(res.headers.get("content-type")).toMatch(/text\/html/);
    expect(await res.text()).toContain("A form may hold at most 64 KiB");
  });

  it("refuses a chunked form without Content-Length once it passes the limit", async () => {
    const res = await fetch(`${server.url}/signin`, {
      method: "POST",
      headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: server.url },
      body: chunked(200 * 1024),
      duplex: "half",
    } as RequestInit);
    expect(res.status).toBe(413);
    expect(await res.text()).toContain("A form may hold at most 64 KiB");
  });

  it("hands a chunked form within the limit to the page whole", async () => {
    const body = new URLSearchParams({ email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD }).toString();
    const res = await fetch(`${server.url}/signin`, {
      method: "POST",
      headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: server.url, "X-Forwarded-For": newAddress() },
      body: new Blob([body]).stream(),
      duplex: "half",
      redirect: "manual",
    } as RequestInit);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/teach");
  });

  it("refuses JSON over 1 MiB (chunked) with a JSON error", async () => {
    const res = await fetch(`${server.url}/api/v1/practice/answers`, {
      method: "POST",
      headers: { "Content-Type": "application/json", Origin: server.url },
      body: chunked(1100 * 1024, 64 * 1024),
      duplex: "half",
    } as RequestInit);
    expect(res.status).toBe(413);
    expect(await res.json()).toEqual({ error: "A JSON request may hold at most 1 MiB; this one was larger." });
  });

  it("refuses an upload over 5 MB", async () => {
    const teacher = await signedIn(DEMO_SCHOOL.teachers[0].email, newAddress());
    const form = new FormData();
    form.set("intent", "preview");
    form.set("file", new File(["x".repeat(5_100_000)], "roster.csv", { type: "text/csv" }));
    const res = await teacher.request(`/teach/classes/${DEMO_SCHOOL.classes[0].id}`, { method: "POST", body: form });
    expect(res.status).toBe(413);
    expect(await res.text()).toContain("An upload may hold at most 5 MB");
  });
});

describe("rate limits", () => {
  it("sign-in: the right password still works from another address while one address is refused", async () => {
    const email = DEMO_SCHOOL.teachers[1].email;
    const attacker = newAddress();
    for (let i = 0; i < 5; i++) expect((await post(server.url, "/signin", { email, password: "guess" }, attacker)).status).toBe(200);
    await expect429(await post(server.url, "/signin", { email, password: DEMO_PASSWORD }, attacker), /Too many failed sign-ins for this account from here\. Try again in 15 minutes\./);
    const owner = await post(server.url, "/signin", { email, password: DEMO_PASSWORD }, newAddress());
    expect(owner.status).toBe(302);
    expect(owner.headers.get("location")).toBe("/teach");
  });

  it("sign-in: an account under attack from many addresses is slowed, never locked", async () => {
    const email = DEMO_SCHOOL.admin.email;
    await server.services.limits.signIn.account.limiter.penalty(email, server.services.limits.signIn.account.limiter.points);
    const started = Date.now();
    const res = await post(server.url, "/signin", { email, password: DEMO_PASSWORD }, newAddress());
    expect(res.status).toBe(302);
    expect(Date.now() - started).toBeGreaterThanOrEqual(1000);
    await server.services.limits.signIn.account.limiter.delete(email);
  });

  it("without TRUST_PROXY a forged X-Forwarded-For changes nothing", async () => {
    const email = DEMO_SCHOOL.teachers[0].email;
    for (let i = 0; i < 5; i++) await post(plain.url, "/signin", { email, password: "guess" }, newAddress());
    await expect429(await post(plain.url, "/signin", { email, password: DEMO_PASSWORD }, newAddress()), /Too many failed sign-ins/);
  });

  it("sign-up", async () => {
    const address = newAddress();
    const fields = { studioName: "S", displayName: "N", password: "long enough password", confirm: "long enough password" };
    for (let i = 0; i < 10; i++) expect((await post(server.url, "/signup", { ...fields, email: `s${i}@limits.example` }, address)).status).toBe(200);
    await expect429(await post(server.url, "/signup", { ...fields, email: "s10@limits.example" }, address), /Too many new studios from this network\. Try again in 60 minutes\./);
  });

  it("password reset", async () => {
    const address = newAddress();
    for (let i = 0; i < 3; i++) expect((await post(server.url, "/forgot", { email: "limit@reset.example" }, address)).status).toBe(200);
    await expect429(await post(server.url, "/forgot", { email: "limit@reset.example" }, address), /Too many reset requests for this address/);
  });

  it("invitations", async () => {
    const teacher = await signedIn(DEMO_SCHOOL.teachers[0].email, newAddress());
    await server.services.limits.invitations.limiter.penalty(DEMO_SCHOOL.teachers[0].id, 300);
    const res = await teacher.post(`/teach/classes/${DEMO_SCHOOL.classes[0].id}`, { intent: "add", name: "Zed P.", email: "zed@limits.example" });
    await expect429(res, /Too many invitations sent for now\. Try again in 60 minutes\./);
    expect(await server.services.db.select().from(users).where(eq(users.email, "zed@limits.example"))).toEqual([]);
    await server.services.limits.invitations.limiter.delete(DEMO_SCHOOL.teachers[0].id);
  });

  it("room-code look-ups on /join and /play/:code (wrong codes count, the limit then refuses every code)", async () => {
    const address = newAddress();
    const room = await openTestRoom(server.services.db);
    for (let i = 0; i < 60; i++) expect((await post(server.url, "/join", { code: "WWWWWW" }, address)).status).toBe(200);
    await expect429(await post(server.url, "/join", { code: room.code }, address), /Too many room codes tried from this network/);
    const play = await new Client(server.url).request(`/play/${room.code}`, { headers: { "X-Forwarded-For": address } });
    await expect429(play, /Too many room codes tried from this network/);
    const elsewhere = await post(server.url, "/join", { code: room.code }, newAddress());
    expect(elsewhere.headers.get("location")).toBe(`/play/${room.code}`);
  });

  it("WebSocket connections per address", async () => {
    const address = newAddress();
    await server.services.limits.sockets.limiter.penalty(address, server.services.limits.sockets.limiter.points - 1);
    const first = await ScriptedSocket.open(server.url, server.url, { "X-Forwarded-For": address });
    const refused = await new Promise<{ status: number; retryAfter: string | undefined; body: string }>((resolve, reject) => {
      const ws = new WebSocket(`${server.url.replace(/^http/, "ws")}/ws`, { origin: server.url, headers: { "X-Forwarded-For": address } });
      ws.once("open", () => reject(new Error("opened")));
      ws.once("unexpected-response", (_req, res) => {
        let body = "";
        res.on("data", (c: Buffer) => (body += c));
        res.on("end", () => resolve({ status: res.statusCode!, retryAfter: res.headers["retry-after"], body }));
      });
    });
    expect(refused.status).toBe(429);
    expect(Number(refused.retryAfter)).toBeGreaterThan(0);
    expect(refused.body).toMatch(/^Too many connections from this network\. Try again in (\d+ seconds?|1 minute)\.$/);
    first.ws.close();
  });

  it("seats per socket and per address", async () => {
    const room = await openTestRoom(server.services.db);
    const pad = await ScriptedSocket.open(server.url, server.url, { "X-Forwarded-For": newAddress() });
    // One connection asking again and again (a socket holds one seat, so these are refused joins:
    // a name with a zero-width character each time); every ask counts.
    pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
    await pad.next("welcome");
    for (let i = 0; i < 5; i++) {
      const from = pad.messages.length;
      pad.send({ type: "join", room: room.code, nickname: `Kit\u200b${"ABCDE"[i]}` });
      expect(await pad.next("error", () => true, from)).toMatchObject({ code: "bad-nickname" });
    }
    const from = pad.messages.length;
    pad.send({ type: "join", room: room.code, nickname: "Kit F" });
    const refusal = await pad.next("error", () => true, from);
    expect(refusal).toMatchObject({ code: "rate-limited", message: expect.stringMatching(/^This phone joined too often\. Try again in (\d+ seconds?|1 minute)\.$/) });
    pad.ws.close();

    const shared = newAddress();
    await server.services.limits.seats.address.limiter.penalty(shared, server.services.limits.seats.address.limiter.points);
    const other = await ScriptedSocket.open(server.url, server.url, { "X-Forwarded-For": shared });
    other.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: room.code });
    await other.next("welcome");
    other.send({ type: "join", room: room.code, nickname: "Lou" });
    expect(await other.next("error")).toMatchObject({ code: "rate-limited", message: expect.stringMatching(/^Too many phones joined from this network/) });
    other.ws.close();
  });
});

describe("same origin", () => {
  const signInFields = { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD };
  it.each([
    [{ "Sec-Fetch-Site": "same-origin", Origin: "null" }, 302],
    [{ "Sec-Fetch-Site": "none" }, 302],
    [{ "Sec-Fetch-Site": "cross-site", Origin: "http://elsewhere.example" }, 403],
    [{ "Sec-Fetch-Site": "same-site", Origin: "http://sub.localhost" }, 403],
    [{ Origin: "http://elsewhere.example" }, 403],
    [{ Origin: "null" }, 403],
  ])("%o → %i", async (headers, status) => {
    const res = await post(server.url, "/signin", signInFields, newAddress(), headers);
    expect(res.status).toBe(status);
    if (status === 403) expect(await res.text()).toContain("This form was sent from another website, so it was refused.");
  });

  it("keeps non-browser clients (no Origin, no Sec-Fetch-Site) working", async () => {
    const res = await fetch(`${server.url}/signin`, {
      method: "POST",
      headers: { "X-Forwarded-For": newAddress() },
      body: new URLSearchParams(signInFields),
      redirect: "manual",
    });
    expect(res.status).toBe(302);
  });

  it("sends a referrer to the same origin only, so browsers send a real Origin", async () => {
    expect((await fetch(`${server.url}/signin`)).headers.get("referrer-policy")).toBe("same-origin");
  });
});

describe("HSTS", () => {
  it("only when served over https (here: a trusted proxy says so)", async () => {
    expect((await fetch(`${server.url}/signin`)).headers.get("strict-transport-security")).toBeNull();
    const https = await fetch(`${server.url}/signin`, { headers: { "X-Forwarded-Proto": "https" } });
    expect(https.headers.get("strict-transport-security")).toMatch(/max-age=\d+/);
    const untrusted = await fetch(`${plain.url}/signin`, { headers: { "X-Forwarded-Proto": "https" } });
    expect(untrusted.headers.get("strict-transport-security")).toBeNull();
  });
});

describe("no account discovery", () => {
  const other = "ottoline@elsewhere.example";

  it("sign-in: an unknown address costs a password check like a known one", async () => {
    const time = async (email: string) => {
      const started = performance.now();
      await post(server.url, "/signin", { email, password: "not the password" }, newAddress());
      return performance.now() - started;
    };
    const known = Math.min(await time(other), await time(other), await time(other));
    const unknown = Math.min(await time("ghost@nowhere.example"), await time("ghost@nowhere.example"), await time("ghost@nowhere.example"));
    expect(unknown).toBeGreaterThan(known / 2);
  });

  it("forgot-password: the same page for a known and an unknown address", async () => {
    const page = async (email: string) => {
      const text = await (await post(server.url, "/forgot", { email }, newAddress())).text();
      return text.replaceAll(text.match(/nonce="([^"]+)"/)![1]!, "NONCE");
    };
    expect(await page(other)).toEqual(await page("ghost@nowhere.example"));
  });

  it("add-teacher: an address with an account at another school gets the new address's answer; its owner gets a note", async () => {
    const admin = await signedIn(DEMO_SCHOOL.admin.email, newAddress());
    const notice = async (email: string) => {
      const res = await admin.post("/admin", { intent: "addTeacher", displayName: "Pim Q.", email, classId: DEMO_SCHOOL.classes[0].id });
      return { status: res.status, notice: (await res.text()).match(/Added Pim Q\.[^<]*/)![0].replace(email, "ADDRESS") };
    };
    expect(await notice(other)).toEqual(await notice("pim@fresh.example"));
    const subjects = (await server.mail()).filter((m) => m.to.includes(other)).map((m) => m.subject);
    expect(subjects).toContain("Someone tried to add you on Fretcall");
    expect(subjects).not.toContain("You're invited to teach on Fretcall");
    expect((await server.mail()).find((m) => m.to.includes("pim@fresh.example"))?.subject).toBe("You're invited to teach on Fretcall");
  });

  it("add-student: likewise", async () => {
    const teacher = await signedIn(DEMO_SCHOOL.teachers[0].email, newAddress());
    const notice = async (name: string, email: string) => {
      const res = await teacher.post(`/teach/classes/${DEMO_SCHOOL.classes[0].id}`, { intent: "add", name, email });
      return { status: res.status, notice: (await res.text()).match(/Added [^<]*/)?.[0]?.replace(name, "NAME") };
    };
    expect(await notice("Ren W.", other)).toEqual(await notice("Rue W.", "ren@fresh.example"));
    expect((await server.mail()).filter((m) => m.to.includes(other)).map((m) => m.subject)).toContain("Someone tried to add you on Fretcall");
    // The other school's account is untouched.
    const [owner] = await server.services.db.select().from(users).where(eq(users.email, other));
    expect(owner?.role).toBe("admin");
  });
});
