import { describe, expect, it } from "vitest";
import { plural } from "./plural";

describe("plural", () => {
  it.each([
    [0, "teacher", undefined, "0 teachers"],
    [1, "teacher", undefined, "1 teacher"],
    [2, "teacher", undefined, "2 teachers"],
    [1, "class", "classes", "1 class"],
    [3, "class", "classes", "3 classes"],
    [-1, "flat", undefined, "-1 flats"],
  ])("%i %s", (n, one, many, words) => {
    expect(plural(n, one, many)).toBe(words);
  });
});
