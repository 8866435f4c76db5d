import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { passwordResets, users } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
});
afterAll(() => server.close());

const signIn = async (email: string, password = DEMO_PASSWORD) => {
  const client = new Client(server.url);
  const res = await client.post("/signin", { email, password });
  return { client, res };
};

describe("sign-up", () => {
  const fields = {
    studioName: "Quayside Strings",
    displayName: "Pella Ashgrove",
    email: "Pella@Quayside.example",
    password: "a long enough secret",
    confirm: "a long enough secret",
  };
  it("mails a link that creates the studio with its admin (once) and lands on the admin home", async () => {
    const client = new Client(server.url);
    const res = await client.post("/signup", fields);
    expect(res.status).toBe(200);
    expect(await res.text()).toContain("Open the link in it within 24 hours");
    expect(await server.services.db.select().from(users).where(eq(users.email, "pella@quayside.example"))).toEqual([]);
    const mail = (await server.mail()).find((m) => m.to.includes("pella@quayside.example"))!;
    expect(mail.subject).toBe("Finish starting your studio on Fretcall");
    const token = new URL(mail.text.match(/https?:\/\/\S+\/signup\?studio=\S+/)![0]).searchParams.get("studio")!;
    const page = await client.get(`/signup?studio=${token}`);
    expect(await page.text()).toContain("Create my studio");
    const done = await client.post("/signup", { intent: "confirm", token });
    expect(done.status).toBe(302);
    expect(done.headers.get("location")).toBe("/admin");
    const me = await (await client.get("/api/v1/me")).json();
    expect(me).toMatchObject({ displayName: "Pella Ashgrove", role: "admin", email: "pella@quayside.example" });
    const again = await new Client(server.url).post("/signup", { intent: "confirm", token });
    expect(await again.text()).toContain("This studio was already created.");
    const forged = await new Client(server.url).post("/signup", { intent: "confirm", token: token.slice(0, -4) + "AAAA" });
    expect(await forged.text()).toContain("This link isn&#x27;t valid or has expired");
  });

  it("answers an address that already has an account exactly as a new one, and mails its owner a note", async () => {
    const answer = async (email: string) => {
      const res = await new Client(server.url).post("/signup", { ...fields, email });
      const text = await res.text();
      // Each page has its own CSP nonce; everything else must match.
      const nonce = text.match(/nonce="([^"]+)"/)![1]!;
      return { status: res.status, text: text.replaceAll(email, "ADDRESS").replaceAll(nonce, "NONCE") };
    };
    const known = await answer(DEMO_SCHOOL.teachers[0].email);
    const unknown = await answer("nobody-yet@quayside.example");
    expect(known).toEqual(unknown);
    const note = (await server.mail()).find((m) => m.to.includes(DEMO_SCHOOL.teachers[0].email) && m.subject === "Your Fretcall account");
    expect(note?.text).toContain("already has an account");
  });

  it.each([
    [{ studioName: "" }, "Enter your studio's name."],
    [{ displayName: "x".repeat(61) }, "Keep your name under 60 characters."],
    [{ email: "not-an-address" }, "That doesn't look like an e-mail address."],
    [{ password: "short", confirm: "short" }, "Use at least 10 characters."],
    [{ confirm: "something else" }, "The two passwords differ."],
  ])("refuses %o with a clear message and creates nothing", async (override, message) => {
    const before = (await server.services.db.select().from(users)).length;
    const client = new Client(server.url);
    const res = await client.post("/signup?_data", {
      studioName: "Studio",
      displayName: "Name",
      email: `fresh-${Math.random()}@example.org`,
      password: "long enough password",
      confirm: "long enough password",
      ...override,
    });
    expect(res.status).toBe(200);
    expect(await res.text()).toContain(message.replace(/'/g, "&#x27;"));
    expect((await server.services.db.select().from(users)).length).toBe(before);
  });
});

describe("sign-in and sign-out", () => {
  it.each([
    [DEMO_SCHOOL.admin.email, "/admin"],
    [DEMO_SCHOOL.teachers[0].email, "/teach"],
    [DEMO_SCHOOL.studentWithSignIn.email, "/me"],
  ])("%s lands on %s", async (email, home) => {
    const { res } = await signIn(email);
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe(home);
  });

  it("sets an httpOnly, SameSite=Lax session cookie (Secure follows PUBLIC_URL: sessions.test.ts)", async () => {
    const { res } = await signIn(DEMO_SCHOOL.admin.email);
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith("fretcall_session="))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });

  it("refuses a wrong password with one message that doesn't reveal whether the account exists", async () => {
    const wrong = await (await signIn(DEMO_SCHOOL.teachers[1].email, "not the password")).res.text();
    const unknown = await (await signIn("nobody@nowhere.example", "not the password")).res.text();
    for (const page of [wrong, unknown]) expect(page).toContain("That e-mail and password don&#x27;t match an account.");
  });

  it("signs out by POST and forgets the session", async () => {
    const { client } = await signIn(DEMO_SCHOOL.teachers[0].email);
    expect((await client.get("/api/v1/me")).status).toBe(200);
    const out = await client.post("/signout", {});
    expect(out.status).toBe(302);
    expect((await client.get("/api/v1/me")).status).toBe(401);
  });

  it("treats a forged cookie as signed out", async () => {
    const client = new Client(server.url);
    client.setCookie("fretcall_session", "eyJ1c2VySWQiOiJkZW1vLWFkbWluIn0%3D.forged");
    expect((await client.get("/api/v1/me")).status).toBe(401);
    const page = await client.get("/admin");
    expect(page.status).toBe(302);
    expect(page.headers.get("location")).toBe("/signin?redirectTo=%2Fadmin");
  });

  it("refuses a cross-site form post", async () => {
    const client = new Client(server.url);
    const res = await client.request("/signin", {
      method: "POST",
      headers: { Origin: "http://elsewhere.example" },
      body: new URLSearchParams({ email: DEMO_SCHOOL.admin.email, password: DEMO_PASSWORD }),
    });
    expect(res.status).toBe(403);
    expect(res.headers.getSetCookie()).toEqual([]);
  });

  it("rate-limits repeated failures of one account from one address, even the right password then", async () => {
    const email = DEMO_SCHOOL.teachers[1].email;
    for (let i = 0; i < 5; i++) await signIn(email, "wrong guess");
    const { res } = await signIn(email);
    expect(res.status).toBe(429);
    expect(Number(res.headers.get("retry-after"))).toBeGreaterThan(800);
    expect(await res.text()).toContain("Too many failed sign-ins for this account from here. Try again in 15 minutes.");
    await server.services.limits.signIn.pair.limiter.delete(`${email} 127.0.0.1`);
  });
});

describe("password reset through the captured e-mail", () => {
  const email = DEMO_SCHOOL.teachers[0].email;
  let link = "";

  it("mails a one-time link", async () => {
    const res = await new Client(server.url).post("/forgot", { email });
    expect(await res.text()).toContain("a reset link is on its way");
    const [mail] = (await server.mail()).filter((m) => m.to.includes(email));
    expect(mail?.subject).toBe("Reset your Fretcall password");
    link = new URL(mail!.text.match(/https?:\/\/\S+\/reset\/\S+/)![0]).pathname;
  });

  it("sets the new password once; the link is then spent", async () => {
    const client = new Client(server.url);
    const short = await client.post(link, { password: "short", confirm: "short" });
    expect(await short.text()).toContain("Use at least 10 characters.");
    const done = await client.post(link, { password: "a brand new password", confirm: "a brand new password" });
    expect(await done.text()).toContain("Your password is changed.");
    expect((await signIn(email, "a brand new password")).res.status).toBe(302);
    expect((await signIn(email)).res.status).toBe(200);
    const again = await client.post(link, { password: "yet another password", confirm: "yet another password" });
    expect(await again.text()).toContain("expired or was already used");
    expect((await signIn(email, "yet another password")).res.status).toBe(200);
  });

  it("refuses an expired link", async () => {
    await new Client(server.url).post("/forgot", { email: DEMO_SCHOOL.admin.email });
    const [mail] = (await server.mail()).filter((m) => m.to.includes(DEMO_SCHOOL.admin.email));
    const path = new URL(mail!.text.match(/https?:\/\/\S+\/reset\/\S+/)![0]).pathname;
    await server.services.db
      .update(passwordResets)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(passwordResets.userId, DEMO_SCHOOL.admin.id));
    expect(await (await new Client(server.url).get(path)).text()).toContain("expired or was already used");
  });

  it("answers the same for an unknown address and sends nothing", async () => {
    const before = (await server.mail()).length;
    const res = await new Client(server.url).post("/forgot", { email: "ghost@nowhere.example" });
    expect(await res.text()).toContain("a reset link is on its way");
    expect((await server.mail()).length).toBe(before);
  });
});

describe("guards: route × role → status", () => {
  const roles = {
    anonymous: undefined,
    student: DEMO_SCHOOL.studentWithSignIn.email,
    teacher: DEMO_SCHOOL.teachers[1].email,
    admin: DEMO_SCHOOL.admin.email,
  } as const;
  // 302 = sent to sign in; 401/403 = refused.
  const table: [string, Record<keyof typeof roles, number>][] = [
    ["/", { anonymous: 200, student: 302, teacher: 302, admin: 302 }],
    ["/signin", { anonymous: 200, student: 302, teacher: 302, admin: 302 }],
    ["/teach", { anonymous: 302, student: 403, teacher: 200, admin: 200 }],
    ["/me", { anonymous: 302, student: 200, teacher: 403, admin: 403 }],
    ["/admin", { anonymous: 302, student: 403, teacher: 403, admin: 200 }],
    ["/admin/outbox", { anonymous: 302, student: 403, teacher: 403, admin: 404 }],
    ["/api/v1/me", { anonymous: 401, student: 200, teacher: 200, admin: 200 }],
  ];
  const clients: Partial<Record<keyof typeof roles, Client>> = {};
  beforeAll(async () => {
    for (const [role, email] of Object.entries(roles) as [keyof typeof roles, string | undefined][]) {
      clients[role] = email ? (await signIn(email)).client : new Client(server.url);
    }
  });
  for (const [path, expected] of table) {
    for (const role of Object.keys(roles) as (keyof typeof roles)[]) {
      it(`${path} as ${role} → ${expected[role]}`, async () => {
        expect((await clients[role]!.get(path)).status).toBe(expected[role]);
      });
    }
  }
});

describe("server", () => {
  it("answers /healthz with JSON", async () => {
    const res = await fetch(`${server.url}/healthz`);
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ status: "ok" });
  });
  it("serves hashed assets with immutable caching", async () => {
    const html = await (await fetch(`${server.url}/signin`)).text();
    const asset = html.match(/\/assets\/[^"]+\.js/)![0];
    const res = await fetch(`${server.url}${asset}`);
    expect(res.headers.get("cache-control")).toMatch(/immutable/);
  });
});
