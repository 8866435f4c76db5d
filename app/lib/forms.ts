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

/** Only same-site paths may be redirect targets after sign-in (no open redirects). */
export function safeRedirect(to: FormDataEntryValue | string | null | undefined, fallback: string) {
  if (typeof to !== "string" || !to.startsWith("/") || to.startsWith("//") || to.startsWith("/\\")) return fallback;
  return to;
}
