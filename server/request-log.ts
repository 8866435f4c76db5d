import type { RequestHandler } from "express";
import type { IncomingMessage, ServerResponse } from "node:http";
import { randomUUID } from "node:crypto";
import type { Logger } from "pino";
import { pinoHttp } from "pino-http";

/** Path segments that are secrets (one-time links) are logged as their route parameter. */
const SECRET_SEGMENTS = /^\/(reset|invite)\/[^/]+/;

/** The path as it may be logged: no query string (it may carry a link's token), no link tokens. */
export function loggablePath(url: string | undefined) {
  const path = (url ?? "/").split(/[?#]/)[0]!;
  return path.replace(SECRET_SEGMENTS, (_whole, kind: string) => `/${kind}/:token`);
}

/**
 * One structured line per request: its id (sent back as X-Request-Id), method, path, status and
 * duration. Headers, bodies and query strings are never logged, so no password, token, cookie
 * or Authorization header can reach the log.
 */
export function requestLog(logger: Logger): RequestHandler {
  return pinoHttp({
    logger,
    genReqId(_req: IncomingMessage, res: ServerResponse) {
      const id = randomUUID();
      res.setHeader("X-Request-Id", id);
      return id;
    },
    wrapSerializers: false,
    serializers: {
      req: (req: IncomingMessage & { id?: unknown; originalUrl?: string }) => ({ id: req.id, method: req.method, path: loggablePath(req.originalUrl ?? req.url) }),
      res: (res: ServerResponse) => ({ statusCode: res.statusCode }),
    },
    customLogLevel: (_req, res, error) => (error || res.statusCode >= 500 ? "error" : "info"),
  }) as unknown as RequestHandler;
}
