import { randomBytes } from "node:crypto";
import { z } from "zod";

const LOOPBACK = new Set(["127.0.0.1", "localhost", "::1"]);

const schema = z
  .object({
    NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
    PORT: z.coerce.number().int().min(0).max(65535).default(3000),
    HOST: z.string().default("0.0.0.0"),
    DATABASE_URL: z
      .string()
      .regex(/^(file:|libsql:|https?:|wss?:)/, "must start with file:, libsql:, http(s): or ws(s):")
      .default("file:data/fretcall.db"),
    DATABASE_AUTH_TOKEN: z.string().optional(),
    SESSION_SECRET: z.string().min(32, "must be at least 32 characters").optional(),
    SMTP_URL: z.url().optional(),
    // 1: a local catcher on loopback receives all mail (MAIL_DIR, admin outbox page). The default
    // outside production; the demo turns it on for its production build.
    MAIL_CAPTURE: z.enum(["0", "1"]).optional(),
    MAIL_FROM: z.string().default("Fretcall <no-reply@fretcall.local>"),
    // Where captured mail is written as files (development and tests).
    MAIL_DIR: z.string().default("data/mail"),
    // Public address used in e-mailed links; defaults to http://localhost:PORT.
    PUBLIC_URL: z.url().optional(),
    // Session lifetimes in days (fractions allowed): from sign-in, and since the last request.
    SESSION_MAX_DAYS: z.coerce.number().positive().max(366).default(30),
    SESSION_IDLE_DAYS: z.coerce.number().positive().max(366).default(7),
    // A live room with nothing recorded for this many hours (fractions allowed) ends by itself, results kept.
    ROOM_IDLE_HOURS: z.coerce.number().positive().max(24 * 30).default(3),
    // A sign-in card's device session (a student's own phone at home): from sign-in, and since the last request.
    CARD_SESSION_DAYS: z.coerce.number().positive().max(366).default(180),
    CARD_SESSION_IDLE_DAYS: z.coerce.number().positive().max(366).default(60),
    // Which proxies in front may name the client (X-Forwarded-For, -Proto): unset or 0 = none, a hop
    // count, or a comma-separated list of proxy addresses/subnets (or loopback, linklocal, uniquelocal).
    TRUST_PROXY: z
      .string()
      .trim()
      .regex(
        /^(\d+|((loopback|linklocal|uniquelocal|[0-9a-fA-F:.]+(\/\d{1,3})?)\s*(,\s*|$))+)$/,
        "must be 0, a hop count, or a comma-separated list of proxy addresses or subnets",
      )
      .optional(),
    LOG_LEVEL: z.enum(["fatal", "error", "warn", "info", "debug", "trace", "silent"]).default("info"),
    // Cluster mode (docs/decisions/0009-several-nodes.md): several nodes share one database and coordinate through
    // Redis. Unset: one node, no Redis, today's behaviour.
    REDIS_URL: z.string().regex(/^rediss?:\/\/\S+$/, "must be a redis:// or rediss:// URL").optional(),
    // This node's name in room leases (`<nodeId>|<fence>|<address>`), so no "|" and nothing long.
    NODE_ID: z
      .string()
      .regex(/^[A-Za-z0-9_.-]{1,64}$/, "must be 1–64 letters, digits, '.', '_' or '-'")
      .default(() => `node-${randomBytes(6).toString("hex")}`),
    // host:port where other nodes reach this one directly (they forward a room's sockets to its owner).
    NODE_ADDRESS: z
      .string()
      .regex(/^(\[[0-9a-fA-F:.]+\]|[A-Za-z0-9.-]+):\d{1,5}$/, "must be host:port, e.g. 10.0.0.5:3000")
      .optional(),
  })
  .superRefine((env, ctx) => {
    if (env.NODE_ENV === "production" && !env.SESSION_SECRET) {
      ctx.addIssue({ code: "custom", path: ["SESSION_SECRET"], message: "is required in production" });
    }
    if (env.NODE_ENV === "production" && !env.SMTP_URL && env.MAIL_CAPTURE !== "1") {
      ctx.addIssue({ code: "custom", path: ["SMTP_URL"], message: "is required in production (or MAIL_CAPTURE=1)" });
    }
    // A node listening beyond loopback may have peers on other machines, for whom loopback would
    // be themselves: it must say where it is reached.
    if (env.NODE_ENV === "production" && env.REDIS_URL && !env.NODE_ADDRESS && !LOOPBACK.has(env.HOST)) {
      ctx.addIssue({ code: "custom", path: ["NODE_ADDRESS"], message: "is required in production with REDIS_URL (unless HOST is loopback)" });
    }
  });

export type Env = Omit<z.infer<typeof schema>, "MAIL_CAPTURE" | "TRUST_PROXY"> & {
  /** Express's `trust proxy`: false, a hop count, or a list of proxy addresses. */
  trustProxy: false | number | string;
  SESSION_SECRET: string;
  PUBLIC_URL: string;
  /** PUBLIC_URL was set, not defaulted: only then does the stage project it as the join address. */
  publicUrlSet: boolean;
  /** Mail goes to the local catcher instead of SMTP_URL. */
  mailCapture: boolean;
};

/** Where other nodes reach this one: NODE_ADDRESS, else (development, tests) loopback on the port it listens on. */
export function nodeAddressOf(env: Pick<Env, "NODE_ADDRESS">, listeningPort: number) {
  return env.NODE_ADDRESS ?? `127.0.0.1:${listeningPort}`;
}

/** Reads and checks the environment; throws one error that lists every problem. */
export function loadEnv(source: Record<string, string | undefined> = process.env): Env {
  const result = schema.safeParse(source);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join(".") || "(env)"}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  const { MAIL_CAPTURE, TRUST_PROXY, ...env } = result.data;
  return {
    ...env,
    trustProxy: !TRUST_PROXY || TRUST_PROXY === "0" ? false : /^\d+$/.test(TRUST_PROXY) ? Number(TRUST_PROXY) : TRUST_PROXY,
    mailCapture: MAIL_CAPTURE ? MAIL_CAPTURE === "1" : !env.SMTP_URL && env.NODE_ENV !== "production",
    // Development and tests get a fixed secret so sessions survive restarts; production must set one.
    SESSION_SECRET: env.SESSION_SECRET ?? "development-only-secret-not-for-production-use",
    PUBLIC_URL: env.PUBLIC_URL ?? `http://localhost:${env.PORT}`,
    publicUrlSet: env.PUBLIC_URL !== undefined,
  };
}
