import { describe, expect, it } from "vitest";
import { seededRandom } from "~/music/pools";
import {
  CLOSE_CODES,
  ERROR_CODES,
  MAX_MESSAGE_BYTES,
  PROTOCOL_VERSION,
  RATE_LIMIT_BURST,
  RATE_LIMIT_STRIKES,
  newRateBucket,
  clientMessageSchema,
  parseClientMessage,
  quickClientMessage,
  reconnectDelayMs,
  readServerMessage,
  serverMessageSchema,
  takeToken,
  type ClientMessage,
  type RateBucket,
} from "./protocol";

const HOST_KEY = "h".repeat(32);
const SEAT = "s".repeat(21);

describe("parseClientMessage: good messages", () => {
  it.each<[string, unknown, ClientMessage]>([
    [
      "host hello",
      { type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: "KMNPRT", hostKey: HOST_KEY },
      { type: "hello", protocol: PROTOCOL_VERSION, role: "host", room: "KMNPRT", hostKey: HOST_KEY },
    ],
    [
      "player hello with a typed room code",
      { type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: "kmn-prt" },
      { type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: "KMNPRT" },
    ],
    [
      "player hello with a seat token",
      { type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: "KMNPRT", seatToken: SEAT },
      { type: "hello", protocol: PROTOCOL_VERSION, role: "player", room: "KMNPRT", seatToken: SEAT },
    ],
    ["join", { type: "join", room: "KMN PRT", nickname: " Sam " }, { type: "join", room: "KMNPRT", nickname: " Sam " }],
    ["ping", { type: "ping", t0: 1234.5 }, { type: "ping", t0: 1234.5 }],
    ["ping with a report", { type: "ping", t0: 3000, last: { t0: 1000, t3: 1150 } }, { type: "ping", t0: 3000, last: { t0: 1000, t3: 1150 } }],
    [
      "answer",
      { type: "answer", promptId: "p3", spot: { string: 2, fret: 5 }, tapAt: 99_000 },
      { type: "answer", promptId: "p3", spot: { string: 2, fret: 5 }, tapAt: 99_000 },
    ],
    ["host action", { type: "host", action: "pause" }, { type: "host", action: "pause" }],
    ["remove", { type: "remove", playerId: "p7x" }, { type: "remove", playerId: "p7x" }],
  ])("%s", (_, input, expected) => {
    expect(parseClientMessage(JSON.stringify(input))).toEqual({ ok: true, message: expected });
  });

  it("accepts binary frames holding UTF-8 JSON", () => {
    const result = parseClientMessage(new TextEncoder().encode(JSON.stringify({ type: "host", action: "start" })));
    expect(result).toEqual({ ok: true, message: { type: "host", action: "start" } });
  });
});

describe("parseClientMessage: malformed messages", () => {
  it.each<[string, string | Uint8Array, RegExp]>([
    ["not JSON", "{type:", /not valid JSON/],
    ["empty", "", /not valid JSON/],
    ["JSON null", "null", /JSON object with a string "type"/],
    ["an array", "[1,2]", /JSON object/],
    ["a number", "42", /JSON object/],
    ["no type", "{}", /JSON object/],
    ["unknown type", '{"type":"cheat"}', /Unknown message type "cheat"; expected one of hello, join/],
    ["prototype games", '{"type":"__proto__"}', /Unknown message type/],
    ["extra field", '{"type":"host","action":"start","admin":true}', /Bad "host" message/],
    ["unknown host action", '{"type":"host","action":"win"}', /action/],
    ["fret out of range", '{"type":"answer","promptId":"p1","spot":{"string":1,"fret":99},"tapAt":1}', /spot\.fret/],
    ["fractional fret", '{"type":"answer","promptId":"p1","spot":{"string":1,"fret":2.5},"tapAt":1}', /spot\.fret/],
    ["negative time", '{"type":"ping","t0":-1}', /t0/],
    ["string time", '{"type":"ping","t0":"now"}', /t0/],
    ["bad room code", '{"type":"join","room":"OOOOOO","nickname":"Sam"}', /room: not a room code/],
    ["host without key", `{"type":"hello","protocol":${PROTOCOL_VERSION},"role":"host","room":"KMNPRT"}`, /hostKey/],
    ["unknown role", `{"type":"hello","protocol":${PROTOCOL_VERSION},"role":"admin","room":"KMNPRT"}`, /Bad "hello" message/],
    ["invalid UTF-8", new Uint8Array([0x7b, 0xff, 0xfe, 0x7d]), /not valid UTF-8/],
  ])("%s → bad-message", (_, raw, message) => {
    const result = parseClientMessage(raw);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.error.code).toBe(ERROR_CODES.badMessage);
    expect(result.error.message).toMatch(message);
    expect(result.close).toBeNull();
  });

  it("refuses another protocol version and asks to close with 4000", () => {
    const result = parseClientMessage(JSON.stringify({ type: "hello", protocol: PROTOCOL_VERSION + 1, role: "player", room: "KMNPRT" }));
    expect(result).toEqual({
      ok: false,
      error: { code: ERROR_CODES.badVersion, message: expect.stringMatching(/Reload the page/) },
      close: CLOSE_CODES.badVersion,
    });
  });
});

describe("parseClientMessage: garbage never throws", () => {
  it("survives 2000 random frames: bytes, mangled JSON, deep nesting", () => {
    const rand = seededRandom(99);
    const good = JSON.stringify({ type: "answer", promptId: "p1", spot: { string: 1, fret: 5 }, tapAt: 1 });
    const frames: (string | Uint8Array)[] = ["[".repeat(2000) + "]".repeat(2000), '{"type":"answer","spot":' + "[".repeat(1000)];
    for (let i = 0; i < 2000; i++) {
      if (i % 2 === 0) frames.push(Uint8Array.from({ length: Math.floor(rand() * 64) }, () => Math.floor(rand() * 256)));
      else {
        const chars = [...good];
        chars[Math.floor(rand() * chars.length)] = String.fromCharCode(Math.floor(rand() * 128));
        frames.push(chars.join(""));
      }
    }
    for (const frame of frames) {
      const result = parseClientMessage(frame);
      if (!result.ok) expect(result.error.message.length).toBeGreaterThan(0);
    }
  });
});

describe("parseClientMessage: size limit", () => {
  const padded = (bytes: number) => {
    const base = JSON.stringify({ type: "join", room: "KMNPRT", nickname: "" });
    return base.replace('""', `"${"a".repeat(bytes - base.length)}"`);
  };

  it("accepts exactly MAX_MESSAGE_BYTES (then the schema judges it)", () => {
    const result = parseClientMessage(padded(MAX_MESSAGE_BYTES));
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.error.code).toBe(ERROR_CODES.badMessage); // nickname too long, not too large
  });

  it.each<[string, string | Uint8Array]>([
    ["one byte over", padded(MAX_MESSAGE_BYTES + 1)],
    ["multi-byte characters over the limit in bytes but not in characters", `{"type":"join","room":"KMNPRT","nickname":"${"é".repeat(2100)}"}`],
    ["a huge string", "x".repeat(10_000_000)],
    ["a big binary frame", new Uint8Array(MAX_MESSAGE_BYTES + 1)],
  ])("%s → too-large, close 4004", (_, raw) => {
    expect(parseClientMessage(raw)).toEqual({
      ok: false,
      error: { code: ERROR_CODES.tooLarge, message: `Messages are limited to ${MAX_MESSAGE_BYTES} bytes.` },
      close: CLOSE_CODES.tooLarge,
    });
  });
});

const SERVER_MESSAGES: [string, unknown][] = [
  ["pong", { type: "pong", t0: 1, t1: 2, t2: 3 }],
  ["refused answer", { type: "answer-ack", promptId: "p1", accepted: false, code: "too-late", message: "Time was up." }],
  ["paused", { type: "paused", phase: "paused", pausedFrom: "reveal", at: 5 }],
  ["resumed", { type: "resumed", phase: "reveal" }],
];

describe("serverMessageSchema (what the server may send; its tests and room.test.ts hold every message to it)", () => {
  it.each(SERVER_MESSAGES)("accepts %s", (_, message) => {
    expect(serverMessageSchema.parse(message)).toEqual(message);
  });

  it.each([
    ["unknown type", { type: "hello" }],
    ["accepted answer without points", { type: "answer-ack", promptId: "p1", accepted: true }],
    ["paused without the phase it paused in", { type: "paused", phase: "paused", at: 5 }],
    ["a phase that is not one", { type: "resumed", phase: "lunch" }],
  ])("refuses %s", (_, message) => {
    expect(serverMessageSchema.safeParse(message).success).toBe(false);
  });
});

describe("readServerMessage (the browser's light check)", () => {
  it.each(SERVER_MESSAGES)("reads %s", (_, message) => {
    expect(readServerMessage(JSON.stringify(message))).toEqual(message);
  });

  it.each([
    ["nonsense", "%%"],
    ["a bare number", "42"],
    ["an array", '[{"type":"pong"}]'],
    ["no type", '{"t0":1}'],
    ["a type no server sends", '{"type":"hello"}'],
  ])("skips %s", (_, raw) => {
    expect(readServerMessage(raw)).toBeNull();
  });
});

describe("takeToken", () => {
  const run = (times: number[]) => {
    let bucket: RateBucket = newRateBucket(0);
    return times.map((t) => {
      const step = takeToken(bucket, t);
      bucket = step.bucket;
      return step.verdict;
    });
  };

  it("allows a burst, then refuses", () => {
    const verdicts = run(Array.from({ length: RATE_LIMIT_BURST + 1 }, () => 0));
    expect(verdicts.slice(0, RATE_LIMIT_BURST).every((v) => v === "allow")).toBe(true);
    expect(verdicts.at(-1)).toBe("refuse");
  });

  it("refills at 8 a second", () => {
    const verdicts = run([...Array.from({ length: RATE_LIMIT_BURST }, () => 0), 100, 125, 250]);
    expect(verdicts.slice(RATE_LIMIT_BURST)).toEqual(["refuse", "allow", "allow"]);
  });

  it("asks to close after RATE_LIMIT_STRIKES refusals in a row", () => {
    const verdicts = run(Array.from({ length: RATE_LIMIT_BURST + RATE_LIMIT_STRIKES }, () => 0));
    expect(verdicts.filter((v) => v === "refuse")).toHaveLength(RATE_LIMIT_STRIKES - 1);
    expect(verdicts.at(-1)).toBe("close");
  });

  it("a steady 4 messages a second is never refused", () => {
    expect(run(Array.from({ length: 200 }, (_, i) => i * 250)).every((v) => v === "allow")).toBe(true);
  });
});

describe("reconnectDelayMs", () => {
  it.each([
    // retry, close code, random → ms (arithmetic: min(5000, 300 × 2^retry) + 300 × random)
    [1, 1006, 0, 600],
    [2, 1006, 0, 1_200],
    [3, 1001, 0.5, 2_550],
    [4, 1011, 0, 4_800],
    [5, 1006, 0, 5_000],
    [12, 1006, 1, 5_300],
    [1, CLOSE_CODES.rateLimited, 0, 5_000],
  ])("retry %i after close %i (random %f) waits %i ms", (retry, code, random, ms) => {
    expect(reconnectDelayMs(retry, code, random)).toBe(ms);
  });
});

describe("quickClientMessage: the hand check of answers and pings agrees with their schemas", () => {
  const answer = { type: "answer", promptId: "p3", spot: { string: 2, fret: 5 }, tapAt: 99_000.5 };
  const ping = { type: "ping", t0: 1234.5, last: { t0: 1000, t3: 1150 } };
  // Every field of both messages given values inside, at the edge of and outside its schema's rules.
  const values: Record<string, unknown[]> = {
    promptId: ["p", "x".repeat(32), "x".repeat(33), "", 7, null, ["p1"], undefined],
    tapAt: [0, 1e12, -1, "99", null, true, undefined],
    naming: ["letters", "solfege", "german", "Letters", "", 1, null, undefined],
    string: [1, 12, 0, 13, 2.5, "2", null, undefined],
    fret: [0, 24, -1, 25, 5.5, "5", null, undefined],
    t0: [0, 5.25, -0.5, "1", null, undefined],
    t3: [0, 99, -1, "99", null, undefined],
  };
  const variants: [string, unknown][] = [
    ["answer", answer],
    ["ping", ping],
    ["ping without a report", { type: "ping", t0: 10 }],
    ...values.promptId!.map((v): [string, unknown] => [`answer promptId ${JSON.stringify(v)}`, { ...answer, promptId: v }]),
    ...values.tapAt!.map((v): [string, unknown] => [`answer tapAt ${JSON.stringify(v)}`, { ...answer, tapAt: v }]),
    ...values.naming!.map((v): [string, unknown] => [`answer naming ${JSON.stringify(v)}`, { ...answer, naming: v }]),
    ...values.string!.map((v): [string, unknown] => [`spot string ${JSON.stringify(v)}`, { ...answer, spot: { string: v, fret: 5 } }]),
    ...values.fret!.map((v): [string, unknown] => [`spot fret ${JSON.stringify(v)}`, { ...answer, spot: { string: 2, fret: v } }]),
    ...values.t0!.map((v): [string, unknown] => [`ping t0 ${JSON.stringify(v)}`, { ...ping, t0: v }]),
    ...values.t3!.map((v): [string, unknown] => [`report t3 ${JSON.stringify(v)}`, { ...ping, last: { t0: 1, t3: v } }]),
    ["answer with an extra field", { ...answer, extra: 1 }],
    ["spot with an extra field", { ...answer, spot: { string: 2, fret: 5, finger: 1 } }],
    ["spot as an array", { ...answer, spot: [2, 5] }],
    ["spot missing", { type: "answer", promptId: "p3", tapAt: 1 }],
    ["ping with an extra field", { ...ping, t1: 5 }],
    ["report with an extra field", { ...ping, last: { t0: 1, t3: 2, t2: 3 } }],
    ["report as null", { ...ping, last: null }],
    ["a host action", { type: "host", action: "start" }],
  ];
  // Through JSON, as frames come; JSON.stringify leaves out undefined fields.
  const frames: [string, unknown][] = [
    ...variants.map(([name, v]): [string, unknown] => [name, JSON.parse(JSON.stringify(v))]),
    ["tapAt past the largest double (JSON.parse gives Infinity)", JSON.parse('{"type":"answer","promptId":"p3","spot":{"string":2,"fret":5},"tapAt":1e999}')],
    ["a __proto__ field", JSON.parse('{"type":"ping","t0":1,"__proto__":{"t0":2}}')],
  ];

  it.each(frames)("%s", (_, frame) => {
    const schema = clientMessageSchema.safeParse(frame);
    const quick = quickClientMessage(frame);
    if (quick !== undefined) expect(schema).toEqual({ success: true, data: quick });
    // An answer or ping the schema accepts takes the quick path (or the check would never be used).
    const type = (frame as { type: string }).type;
    if (schema.success && (type === "answer" || type === "ping")) expect(quick).toBeDefined();
  });
});

