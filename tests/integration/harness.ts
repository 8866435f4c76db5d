import { randomBytes } from "node:crypto";
import { DEMO_PASSWORD } from "~/demo/school";
import { readOutbox, type CapturedMail } from "~/mail/outbox.server";
import { startServer, type RunningServer } from "../../server/index";
import { startMailCatcher } from "../../server/mail-catcher";

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
