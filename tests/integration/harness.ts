import { randomBytes } from "node:crypto";
import { afterAll, beforeAll } from "vitest";
import { DEMO_PASSWORD } from "~/demo/school";
import { readOutbox, type CapturedMail } from "~/mail/outbox.server";
import { startServer, type RunningServer } from "../../server/index";
import { startMailCatcher } from "../../server/mail-catcher";
import { seedDemo } from "../../server/seed";

export interface TestServer extends RunningServer {
  mailDir: string;
  mail(): Promise<CapturedMail[]>;
}

/**
 * The production build on an ephemeral port, with this test file's own database and a mail
 * catcher whose captured messages the test reads back.
 */
export async function startTestServer(extra: Record<string, string> = {}): Promise<TestServer> {
  const mailDir = `tests/.tmp/mail-${randomBytes(4).toString("hex")}`;
  const catcher = await startMailCatcher(mailDir);
  const running = await startServer({
    NODE_ENV: "production",
    PORT: "0",
    HOST: "127.0.0.1",
    SESSION_SECRET: randomBytes(24).toString("hex"),
    SMTP_URL: catcher.url,
    MAIL_DIR: mailDir,
    LOG_LEVEL: "silent",
    ...extra,
  });
  return {
    ...running,
    mailDir,
    // Mail leaves after the answer, from a queue: wait for what is queued so far.
    mail: async () => {
      await running.services.mailQueue.idle();
      return readOutbox(mailDir);
    },
    async close() {
      await running.close();
      await catcher.close();
    },
  };
}

/** The test file's server with the demo school in it, started before its tests and closed after them. */
export function demoServer() {
  const running = {} as { server: TestServer; secret: string };
  beforeAll(async () => {
    running.server = await startTestServer();
    running.secret = running.server.services.env.SESSION_SECRET;
    await seedDemo(running.server.services.db);
  });
  afterAll(() => running.server.close());
  return running;
}

/** A browser-like client: keeps cookies, sends a same-origin Origin on posts, never follows redirects. */
export class Client {
  private cookies = new Map<string, string>();
  constructor(readonly base: string) {}

  cookieHeader() {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }

  setCookie(name: string, value: string) {
    this.cookies.set(name, value);
  }

  async request(path: string, init: RequestInit = {}) {
    const headers = new Headers(init.headers);
    if (this.cookies.size) headers.set("Cookie", this.cookieHeader());
    if (init.method && init.method !== "GET" && !headers.has("Origin")) headers.set("Origin", this.base);
    const res = await fetch(new URL(path, this.base), { ...init, headers, redirect: "manual" });
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair!.indexOf("=");
      const name = pair!.slice(0, eq);
      const value = pair!.slice(eq + 1);
      if (/max-age=0|expires=thu, 01 jan 1970/i.test(line) || value === "") this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
    return res;
  }

  get(path: string) {
    return this.request(path);
  }

  post(path: string, fields: Record<string, string>) {
    return this.request(path, { method: "POST", body: new URLSearchParams(fields) });
  }
}

/** A client signed in with a demo account's password (the sign-in must succeed). */
export async function signedIn(base: string, email: string, password = DEMO_PASSWORD) {
  const client = new Client(base);
  const res = await client.post("/signin", { email, password });
  if (res.status !== 302) throw new Error(`signing in as ${email} answered ${res.status}`);
  return client;
}

/**
 * A new studio through the pages, as a person does it: sign up, open the e-mailed link, confirm.
 * Returns the new admin's client, signed in; `headers` go with every request (e.g. a User-Agent).
 */
export async function startStudio(
  server: TestServer,
  fields: { studioName: string; displayName: string; email: string; password: string },
  headers: Record<string, string> = {},
) {
  const client = new Client(server.url);
  const post = (body: Record<string, string>) => client.request("/signup", { method: "POST", headers, body: new URLSearchParams(body) });
  const asked = await post({ ...fields, confirm: fields.password });
  if (asked.status !== 200) throw new Error(`sign-up answered ${asked.status}`);
  const mail = (await server.mail()).findLast((m) => m.to.includes(fields.email) && /studio=/.test(m.text));
  const token = mail && new URL(mail.text.match(/https?:\/\/\S+\/signup\?studio=\S+/)![0]).searchParams.get("studio");
  if (!token) throw new Error(`no sign-up link reached ${fields.email}`);
  const done = await post({ intent: "confirm", token });
  if (done.status !== 302) throw new Error(`confirming the studio answered ${done.status}`);
  return client;
}

/** Reads server-sent events until `until` matches what arrived so far. */
export async function readUntil(body: ReadableStream<Uint8Array>, until: RegExp) {
  const reader = body.getReader();
  const decoder = new TextDecoder();
  let text = "";
  const deadline = Date.now() + 8_000;
  while (!until.test(text) && Date.now() < deadline) {
    const { value, done } = await reader.read();
    if (done) break;
    text += decoder.decode(value, { stream: true });
  }
  reader.releaseLock();
  return text;
}
