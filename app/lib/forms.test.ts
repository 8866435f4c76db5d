import { describe, expect, it } from "vitest";
import { z } from "zod";
import { parseForm, safeRedirect } from "./forms";

describe("parseForm", () => {
  const schema = z.object({ name: z.string().min(1, "Enter a name."), age: z.coerce.number().int("Whole years.") });
  const form = (entries: Record<string, string>) => {
    const f = new FormData();
    for (const [k, v] of Object.entries(entries)) f.set(k, v);
    return f;
  };
  it("returns typed data when valid", () => {
    expect(parseForm(schema, form({ name: "Ada", age: "12" }))).toEqual({ ok: true, data: { name: "Ada", age: 12 } });
  });
  it("gives one message per field", () => {
    expect(parseForm(schema, form({ name: "", age: "1.5" }))).toEqual({
      ok: false,
      errors: { name: "Enter a name.", age: "Whole years." },
    });
  });
});

describe("safeRedirect", () => {
  it.each([
    ["/teach", "/teach"],
    ["/me?x=1", "/me?x=1"],
    ["//evil.example", "/"],
    ["/\\evil.example", "/"],
    ["https://evil.example", "/"],
    [null, "/"],
  ])("%s → %s", (to, expected) => expect(safeRedirect(to, "/")).toBe(expected));
});
