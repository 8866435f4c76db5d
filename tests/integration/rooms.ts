import { nanoid } from "nanoid";
import type { Db } from "~/db/client.server";
import { rooms } from "~/db/schema";
import { PROTOCOL_VERSION } from "~/game/protocol";
import { newRoomCode } from "~/game/roomCode";
import { drawnPrompts, roomConfig, type RoomConfig } from "~/game/roomConfig";
import { DEMO_SCHOOL } from "~/demo/school";
import type { ReadingSpec } from "~/music/pools";
import { hostKeyFor } from "~/rooms/rooms.server";
import { TestSocket } from "./socket";

export const SPEC: ReadingSpec = {
  position: 5,
  tuning: "standard",
  frets: 15,
  reading: "guitar",
  keyFifths: 0,
  accidentals: "naturals",
  ledgerLines: false,
};

type TestSettings = Partial<Parameters<typeof roomConfig>[1]> & { prompts?: number };

/** A Sprint config with a short countdown, as the host form would make it. */
export function testRoomConfig(code: string, overrides: TestSettings = {}): RoomConfig {
  const { prompts = 4, ...settings } = overrides;
  return roomConfig(SPEC, { code, mode: "sprint", countdownMs: 300, answerMs: 5_000, ...settings }, drawnPrompts(SPEC, prompts, 42));
}

/** Opens a room for the demo teacher. */
export async function openTestRoom(db: Db, overrides: TestSettings = {}) {
  const code = newRoomCode();
  const config = testRoomConfig(code, overrides);
  const id = nanoid();
  await db.insert(rooms).values({
    id,
    code,
    orgId: DEMO_SCHOOL.id,
    hostUserId: DEMO_SCHOOL.teachers[0].id,
    title: "Test round",
    mode: config.mode,
    position: SPEC.position,
    config,
  });
  return { id, code, config };
}

export async function openStage(url: string, secret: string, room: { id: string; code: string }) {
  const stage = await TestSocket.open(url);
  stage.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: room.code, hostKey: hostKeyFor(secret, room.id) });
  await stage.next("welcome");
  return stage;
}

export async function joinPlayer(url: string, code: string, nickname: string) {
  const pad = await TestSocket.open(url);
  pad.send({ type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: code });
  await pad.next("welcome");
  pad.send({ type: "join", room: code, nickname });
  const welcome = await pad.next("welcome", (m) => m.you !== null);
  return { pad, you: welcome.you! };
}

/** Waits until the prompt is open on the server's clock (the pad would show it then). */
export async function untilShown(showAt: number) {
  const wait = showAt - Date.now() + 5;
  if (wait > 0) await new Promise((r) => setTimeout(r, wait));
}

/** Only what a pad sends: the protocol refuses extra fields. */
export const spotOf = ({ string, fret }: { string: number; fret: number }) => ({ string, fret });
