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
    [undefined, "/"],
    ["", "/"],
    ["/teach/classes/abc/review#notes", "/teach/classes/abc/review#notes"],
    ["/%2F%2Fevil.example", "/"], // encoded slashes
    ["/%2fevil.example", "/"],
    ["/%5Cevil.example", "/"], // encoded backslash
    ["/\t/evil.example", "/"], // a tab browsers drop, leaving //evil.example
    ["/\n/evil.example", "/"],
    ["/\u0000teach", "/"],
    ["/%09/evil.example", "/"], // encoded control character
    ["/ /evil.example", "/"],
    ["\\\\evil.example", "/"],
    ["/\\/evil.example", "/"],
    ["javascript:alert(1)", "/"],
    ["data:text/html,hi", "/"],
    ["mailto:someone@example.org", "/"],
    ["teach", "/"], // relative, not a path
    ["/%", "/%"], // odd but harmless: stays on the site
    ["/" + "a".repeat(3000), "/"],
  ])("%j → %s", (to, expected) => expect(safeRedirect(to, "/")).toBe(expected));
  it("refuses a file in place of a path", () => {
    expect(safeRedirect(new File(["/teach"], "x.txt"), "/me")).toBe("/me");
  });
});
