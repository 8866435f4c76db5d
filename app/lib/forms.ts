import type { z } from "zod";

export type FieldErrors = Partial<Record<string, string>>;

/** Parses a form with a zod schema; on failure gives the first message per field. */
export function parseForm<S extends z.ZodType>(schema: S, form: FormData) {
  return parseFields(schema, Object.fromEntries(form));
}

/** As parseForm, for fields that arrive as an object (stored JSON, a request body). */
export function parseFields<S extends z.ZodType>(
  schema: S,
  fields: unknown,
): { ok: true; data: z.infer<S> } | { ok: false; errors: FieldErrors } {
  const result = schema.safeParse(fields);
  if (result.success) return { ok: true, data: result.data };
  const errors: FieldErrors = {};
  for (const issue of result.error.issues) {
    const key = String(issue.path[0] ?? "form");
    errors[key] ??= issue.message;
  }
  return { ok: false, errors };
}

const REDIRECT_MAX = 2000;
const SITE = "http://site.invalid";

/**
 * Only same-site paths may be redirect targets after sign-in (no open redirects). Anything odd —
 * another scheme or host, "//", backslashes, tabs or other control characters (browsers drop or
 * turn them into slashes), encoded slashes, backslashes or control characters, a file (not a
 * string), an overlong value — gives the fallback (the role's home), never an error.
 */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback: string) {
  if (typeof to !== "string" || to.length > REDIRECT_MAX) return fallback;
  if (!to.startsWith("/") || to.startsWith("//")) return fallback;
  if (/[\\\u0000-\u001f\u007f-\u009f\s]/.test(to) || /%(2f|5c|[01][0-9a-f]|7f)/i.test(to)) return fallback;
  try {
    const url = new URL(to, SITE);
    return url.origin === SITE ? `${url.pathname}${url.search}${url.hash}` : fallback;
  } catch {
    return fallback;
  }
}
