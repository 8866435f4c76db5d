import { pino } from "pino";

/**
 * The server's structured log. Secrets never reach it: request logs carry no headers or query
 * strings (see server/request-log.ts), and these paths are blanked wherever else they turn up.
 */
export function createLogger(level: string) {
  return pino({
    level,
    redact: {
      paths: [
        "password",
        "*.password",
        "token",
        "*.token",
        "req.headers.authorization",
        "req.headers.cookie",
        'res.headers["set-cookie"]',
      ],
      censor: "[hidden]",
    },
  });
}
