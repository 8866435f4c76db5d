import { describe, expect, it } from "vitest";
import { RoomConfigError } from "~/game/roomConfig";
import { MusicError } from "~/music/pitch";
import { formErrors, UserError } from "./userError";

describe("formErrors", () => {
  it("shows a user's mistake on its field, or on the form", () => {
    expect(formErrors(new UserError("Bars 9–12 have no notes.", "toBar"))).toEqual({ toBar: "Bars 9–12 have no notes." });
    expect(formErrors(new UserError("That tune doesn't exist."))).toEqual({ form: "That tune doesn't exist." });
  });

  it("counts the music engine's and the room set-up's refusals as user mistakes", () => {
    expect(formErrors(new MusicError("Unknown note “H4”."))).toEqual({ form: "Unknown note “H4”." });
    expect(formErrors(new RoomConfigError("Teams needs 2 to 8 teams."))).toEqual({ form: "Teams needs 2 to 8 teams." });
  });

  it("throws anything else on, so a bug is never worded as the user's fault", () => {
    const bug = new RangeError("Invalid array length");
    expect(() => formErrors(bug)).toThrow(bug);
    expect(() => formErrors(new TypeError("x is undefined"))).toThrow(TypeError);
  });
});
