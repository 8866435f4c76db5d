// Reading a JSON request body for the API: size-capped, with a clear error instead of a crash.
const MAX_BODY_BYTES = 128 * 1024;

export type JsonBody = { ok: true; value: unknown } | { ok: false; response: Response };

const refuse = (status: number, error: string) => ({ ok: false as const, response: Response.json({ error, problems: [] }, { status }) });

export async function readJsonBody(request: Request): Promise<JsonBody> {
  if (!/^application\/json\b/i.test(request.headers.get("Content-Type") ?? "")) {
    return refuse(415, "Send the body as JSON, with Content-Type: application/json.");
  }
  const text = await request.text();
  if (new TextEncoder().encode(text).length > MAX_BODY_BYTES) return refuse(413, `The body is larger than ${MAX_BODY_BYTES / 1024} KiB; send less at a time.`);
  try {
    return { ok: true, value: JSON.parse(text) };
  } catch {
    return refuse(400, "The body is not valid JSON.");
  }
}

export const noStore = { "Cache-Control": "private, no-store" };
