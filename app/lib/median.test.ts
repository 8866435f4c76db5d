import { describe, expect, it } from "vitest";
import { median } from "./median";

describe("median", () => {
  it("takes the middle value, or the mean of the middle two, without reordering its input", () => {
    const odd = [900, 100, 500];
    expect(median(odd)).toBe(500);
    expect(odd).toEqual([900, 100, 500]);
    expect(median([600, 900, 700, 500])).toBe(650);
    expect(median([])).toBeNull();
  });
});
