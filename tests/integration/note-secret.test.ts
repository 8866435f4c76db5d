// The note stays secret until it shows: a pad that reads every frame it gets (as a student with the
// developer tools open would) finds nothing of the note before showAt, however it connects.
import { describe, expect, it } from "vitest";
import { PROTOCOL_VERSION } from "~/game/protocol";
import type { PromptNote } from "~/game/roomConfig";
import { hostKeyFor } from "~/rooms/rooms.server";
import { displayPitch, parsePitch } from "~/music/pitch";
import { joinPlayer, openStage, openTestRoom, ScriptedSocket, spotOf } from "../../server/scripted-rooms";
import { demoServer } from "./harness";

const running = demoServer();

/** Every frame a socket gets, with the server's clock at its arrival (the test server runs in this process). */
function recordFrames(socket: ScriptedSocket) {
  const frames: { at: number; text: string }[] = [];
  socket.ws.on("message", (data) => frames.push({ at: Date.now(), text: String(data) }));
  return { frames, before: (t: number) => frames.filter((f) => f.at < t).map((f) => f.text) };
}

/** The first frame that tells the note: its spelling in either form, or a field only a note, its spots or its MIDI number fill. */
function tells(frames: string[], note: PromptNote): string | null {
  // As whole JSON strings: random ids and seat tokens may hold "G4" by chance.
  const forms = [note.written, displayPitch(parsePitch(note.written))].map((f) => JSON.stringify(f));
  const fields = /"(written|writtenMidi|midi|printedAccidental|ledger|keyFifths|spotsToFind|home|otherSpots|spots?|found|heat)"\s*:/;
  return frames.find((text) => fields.test(text) || forms.some((f) => text.includes(f))) ?? null;
}

const hello = (code: string, seatToken?: string) => ({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code, ...(seatToken ? { seatToken } : {}) });

describe.each(["sprint", "full-neck"] as const)("%s: the note stays secret until it shows", (mode) => {
  it("a pad reading every frame finds no note before showAt, and the note at showAt", async () => {
    const room = await openTestRoom(running.server.services.db, { mode, prompts: 2, countdownMs: 3_000 });
    const stage = await openStage(running.server.url, running.secret, room);
    const stageFrames = recordFrames(stage);
    const ana = await joinPlayer(running.server.url, room.code, "Ana");
    const anaFrames = recordFrames(ana.pad);
    const bo = await joinPlayer(running.server.url, room.code, "Bo");
    stage.send({ type: "host", action: "start" });

    const prompt = await ana.pad.next("prompt");
    const note = room.config.prompts[0]!;
    // A scripted pad answering the instant the prompt arrives is refused, as before.
    ana.pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(note.home), tapAt: Date.now() });
    expect(await ana.pad.next("answer-ack")).toMatchObject({ accepted: false, code: "not-open" });
    // The stage has the note ahead, to draw it off-screen.
    const early = await stage.next("note");
    expect(early).toMatchObject({ promptId: prompt.promptId, written: note.written });
    expect(stageFrames.before(prompt.showAt).some((t) => t.includes('"type":"note"'))).toBe(true);

    // Others opening the room during the countdown: a new page, and a phone taking its seat back.
    const stranger = await ScriptedSocket.open(running.server.url);
    stranger.send(hello(room.code));
    await stranger.next("prompt");
    bo.pad.close();
    const back = await ScriptedSocket.open(running.server.url);
    const backFrames = recordFrames(back);
    back.send(hello(room.code, bo.you.seatToken));
    await back.next("prompt");
    expect(Date.now()).toBeLessThan(prompt.showAt);

    const shown = await ana.pad.next("note");
    const arrived = anaFrames.frames.find((f) => f.text.includes('"type":"note"'))!.at;
    expect(arrived).toBeGreaterThanOrEqual(prompt.showAt);
    expect(shown).toMatchObject({ promptId: prompt.promptId, written: note.written });
    expect(tells(anaFrames.before(prompt.showAt), note)).toBeNull();
    expect(tells(backFrames.before(prompt.showAt), note)).toBeNull();
    expect(tells(stranger.messages.map((m) => JSON.stringify(m)), note)).toBeNull();
    expect((await back.next("note")).written).toBe(note.written);

    // Once it shows, a phone coming back gets it in its catch-up.
    back.close();
    const again = await ScriptedSocket.open(running.server.url);
    again.send(hello(room.code, bo.you.seatToken));
    await again.next("welcome");
    expect((await again.next("note")).written).toBe(note.written);
    for (const s of [stage, ana.pad, again, stranger]) s.close();
  }, 30_000);
});

describe("pausing hides the note", () => {
  it("a paused prompt's note reaches no pad until the new showAt; the reloaded stage keeps it, hidden under the pause", async () => {
    const room = await openTestRoom(running.server.services.db, { prompts: 2, countdownMs: 1_000 });
    const stage = await openStage(running.server.url, running.secret, room);
    const ana = await joinPlayer(running.server.url, room.code, "Ana");
    const bo = await joinPlayer(running.server.url, room.code, "Bo");
    stage.send({ type: "host", action: "start" });
    const prompt = await ana.pad.next("prompt");
    const note = room.config.prompts[0]!;
    await ana.pad.next("note");
    ana.pad.send({ type: "answer", promptId: prompt.promptId, spot: spotOf(note.home), tapAt: Date.now() });
    await ana.pad.next("answer-ack");

    const from = stage.messages.length;
    stage.send({ type: "host", action: "pause" });
    await stage.next("paused", () => true, from);
    // Bo's phone drops and comes back while paused: no note.
    bo.pad.close();
    const back = await ScriptedSocket.open(running.server.url);
    const backFrames = recordFrames(back);
    back.send(hello(room.code, bo.you.seatToken));
    await back.next("paused");
    expect(tells(backFrames.frames.map((f) => f.text), note)).toBeNull();
    // A reloaded stage: the prompt, its note (kept off-screen), the pause.
    const reloaded = await ScriptedSocket.open(running.server.url);
    reloaded.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: hostKeyFor(running.secret, room.id) });
    await reloaded.next("paused");
    expect(reloaded.messages.map((m) => m.type)).toEqual(["welcome", "roster", "prompt", "note", "answered", "paused"]);
    expect(reloaded.messages.find((m) => m.type === "note")).toMatchObject({ written: note.written });

    const resumedFrom = back.messages.length;
    stage.send({ type: "host", action: "resume" });
    const again = await back.next("prompt", () => true, resumedFrom);
    expect(again.showAt).toBeGreaterThan(Date.now());
    const shown = await back.next("note", () => true, resumedFrom);
    expect(shown.written).toBe(note.written);
    expect(backFrames.frames.find((f, i) => i >= resumedFrom && f.text.includes('"type":"note"'))!.at).toBeGreaterThanOrEqual(again.showAt);
    for (const s of [stage, ana.pad, back, reloaded]) s.close();
  }, 30_000);
});
