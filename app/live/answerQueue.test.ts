import { describe, expect, it } from "vitest";
import type { ServerMessage } from "~/game/protocol";
import { addTap, applyAck, connectionLost, dueTaps, markSent, seatLost, type Tap } from "./answerQueue";

type Ack = Extract<ServerMessage, { type: "answer-ack" }>;
const accepted = (promptId: string, points = 900): Ack => ({
  type: "answer-ack",
  promptId,
  accepted: true,
  points,
  total: points,
  streak: 1,
  reactionMs: 1_000,
  diagnosis: { kind: "home-spot", pitchRight: true, semitones: 0, message: "Home spot." },
  found: null,
});
const refused = (promptId: string, code: Extract<Ack, { accepted: false }>["code"], message = "Because."): Ack => ({ type: "answer-ack", promptId, accepted: false, code, message });
const never = () => false;
const spot = { string: 3, fret: 5 };

/** Sends whatever is due, as the hook does on an open, seated socket. */
const send = (taps: Tap[], isOpen: (id: string) => boolean = never) => markSent(taps, dueTaps(taps, isOpen));

describe("the pad's taps", () => {
  it("keeps a tap made while offline, sends it once seated, and counts it only on the ack", () => {
    let taps = addTap([], { promptId: "p1", spot, tapAt: 1_234 });
    expect(taps[0]).toMatchObject({ status: "unsent", tapAt: 1_234 });
    taps = send(taps);
    expect(taps[0]!.status).toBe("sent");
    taps = applyAck(taps, accepted("p1"));
    expect(taps[0]).toMatchObject({ status: "counted", ack: { points: 900 } });
  });

  it("sends again what lost its connection before the reply; the catch-up's ack is not taken for the reply", () => {
    let taps = connectionLost(send(addTap([], { promptId: "p1", spot, tapAt: 1 })));
    expect(taps[0]!.status).toBe("unsent");
    // The reconnect's catch-up repeats the acks of the prompt on screen: nothing was waiting for it.
    taps = applyAck(taps, accepted("p1", 500));
    expect(taps[0]!.status).toBe("unsent");
    taps = applyAck(send(taps), accepted("p1", 700));
    expect(taps[0]).toMatchObject({ status: "counted", ack: { points: 700 } });
  });

  it("holds a tap the server cannot take now, and sends it once its prompt is open", () => {
    let taps = applyAck(send(addTap([], { promptId: "p2", spot, tapAt: 1 })), refused("p2", "paused"));
    expect(taps[0]!.status).toBe("held");
    expect(dueTaps(taps, never)).toEqual([]);
    expect(dueTaps(taps, (id) => id === "p2")).toHaveLength(1);
    taps = applyAck(send(taps, () => true), refused("p2", "not-open"));
    expect(taps[0]!.status).toBe("held");
  });

  it("waits for the next connection after a stopping server's refusal", () => {
    const taps = applyAck(send(addTap([], { promptId: "p1", spot, tapAt: 1 })), refused("p1", "stopping"));
    expect(taps[0]!.status).toBe("unsent");
  });

  it("shows a refusal with the server's reason, and lets the refused tap make way", () => {
    let taps = applyAck(send(addTap([], { promptId: "p1", spot, tapAt: 1 })), refused("p1", "too-late", "Too late: the answer was shown."));
    expect(taps[0]).toMatchObject({ status: "refused", refusal: { code: "too-late", reason: "Too late: the answer was shown." } });
    taps = addTap(taps, { promptId: "p2", spot, tapAt: 2 });
    expect(taps.map((t) => t.promptId)).toEqual(["p2"]);
  });

  it("matches replies to taps in the order they were sent (Full neck: several taps on one prompt)", () => {
    let taps = addTap([], { promptId: "p1", spot, tapAt: 1 });
    taps = send(addTap(taps, { promptId: "p1", spot: { string: 2, fret: 10 }, tapAt: 2 }));
    taps = applyAck(taps, accepted("p1", 1_000));
    taps = applyAck(taps, refused("p1", "turn-over"));
    expect(taps.map((t) => t.status)).toEqual(["counted", "refused"]);
  });

  it("keeps an earlier prompt's tap still on its way when a new one is made", () => {
    const taps = addTap(addTap([], { promptId: "p1", spot, tapAt: 1 }), { promptId: "p2", spot, tapAt: 2 });
    expect(taps.map((t) => t.promptId)).toEqual(["p1", "p2"]);
    expect(dueTaps(taps, never)).toHaveLength(2);
  });

  it("refuses what was still waiting when the seat is lost, and leaves settled taps alone", () => {
    let taps = applyAck(send(addTap([], { promptId: "p1", spot, tapAt: 1 })), accepted("p1"));
    taps = seatLost(addTap(taps, { promptId: "p1", spot: { string: 1, fret: 5 }, tapAt: 2 }), "Join again.");
    expect(taps.map((t) => t.status)).toEqual(["counted", "refused"]);
    expect(taps[1]!.refusal).toEqual({ code: "unknown-player", reason: "Join again." });
  });
});
