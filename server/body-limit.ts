import type { Request, RequestHandler, Response } from "express";
import { Readable } from "node:stream";

/** The most a request body may hold, by kind (README, "Limits"). */
export const BODY_LIMITS = {
  form: 64 * 1024,
  json: 1024 * 1024,
  upload: 5 * 1000 * 1000,
} as const;

const WITHOUT_BODY = new Set(["GET", "HEAD", "OPTIONS"]);

function limitFor(contentType: string | undefined) {
  const type = (contentType ?? "").split(";")[0]!.trim().toLowerCase();
  if (type === "multipart/form-data") return { bytes: BODY_LIMITS.upload, what: "An upload" };
  if (type === "application/json" || type.endsWith("+json")) return { bytes: BODY_LIMITS.json, what: "A JSON request" };
  return { bytes: BODY_LIMITS.form, what: "A form" };
}

export const sizeWords = (bytes: number) =>
  bytes >= 1000 * 1000 && bytes % (1000 * 1000) === 0
    ? `${bytes / 1000 / 1000} MB`
    : bytes >= 1024 * 1024
      ? `${bytes / 1024 / 1024} MiB`
      : `${bytes / 1024} KiB`;

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

function refuse(req: Request, res: Response, message: string) {
  // The rest of the body is read and dropped, and the connection closed after the answer.
  req.resume();
  res.status(413).set({ Connection: "close", "Cache-Control": "no-store" });
  // Pages and their data requests get the sentence too: a browser with JavaScript shows it in the
  // error page (it reads `error` from the JSON), one without it sees the small page.
  if (req.path.startsWith("/api/") || req.path.endsWith(".data")) {
    res.json({ error: message });
    return;
  }
  res.type("html").send(
    `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">` +
      `<title>Too large · Fretcall</title></head><body style="font-family: sans-serif; max-width: 36rem; margin: 4rem auto; padding: 0 1rem">` +
      `<h1>That was too large</h1><p>${escapeHtml(message)}</p><p><a href="javascript:history.back()">Go back</a> and try again with less, or <a href="/">start again</a>.</p></body></html>`,
  );
}

/**
 * Wraps the request handler so it only ever sees a body within the limit of its kind. The limit is
 * counted on the stream itself (a chunked body has no Content-Length to trust): the body is read
 * into memory up to the limit, then the handler gets a fresh copy of the request that reads from
 * it. One over the limit gets 413 with a sentence that states it, before any handler runs.
 */
export function limitBodies(handler: RequestHandler): RequestHandler {
  return (req, res, next) => {
    if (WITHOUT_BODY.has(req.method)) return handler(req, res, next);
    const { bytes, what } = limitFor(req.headers["content-type"]);
    const message = `${what} may hold at most ${sizeWords(bytes)}; this one was larger.`;
    if (Number(req.headers["content-length"] ?? 0) > bytes) return refuse(req, res, message);
    const chunks: Buffer[] = [];
    let seen = 0;
    const onData = (chunk: Buffer) => {
      seen += chunk.length;
      if (seen <= bytes) return void chunks.push(chunk);
      stop();
      chunks.length = 0;
      refuse(req, res, message);
    };
    const onEnd = () => {
      stop();
      handler(withBody(req, Buffer.concat(chunks)), res, next);
    };
    const onError = (error: Error) => {
      stop();
      next(error);
    };
    const stop = () => {
      req.off("data", onData);
      req.off("end", onEnd);
      req.off("error", onError);
    };
    req.on("data", onData);
    req.on("end", onEnd);
    req.on("error", onError);
  };
}

/**
 * The same request (headers, URL, Express's additions, all inherited) whose body stream starts
 * afresh and reads the bytes already taken in.
 */
function withBody(req: Request, body: Buffer): Request {
  const fresh = Object.create(req) as Request;
  // Own stream state and listeners, shadowing the spent ones of the original.
  Readable.call(fresh as unknown as Readable);
  fresh._read = () => {};
  fresh._destroy = (error, done) => done(error);
  if (body.length) fresh.push(body);
  fresh.push(null);
  return fresh;
}
