import { eq } from "drizzle-orm";
import { strToU8, unzlibSync, zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken } from "~/auth/tokens.server";
import { tunes } from "~/db/schema";
import { DEMO_PASSWORD, DEMO_SCHOOL } from "~/demo/school";
import { defaultTempo } from "~/practice/rhythm";
import { seedDemo } from "../../server/seed";
import { Client, startTestServer, type TestServer } from "./harness";

// A two-bar melody in G major written for this test (MusicXML 4.0 partwise): F♯ comes from the key.
const SCORE = `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <work><work-title>Quay Steps</work-title></work>
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part></part-list>
  <part id="P1">
    <measure number="1">
      <attributes><divisions>1</divisions><key><fifths>1</fifths></key><time><beats>4</beats><beat-type>4</beat-type></time></attributes>
      <note><pitch><step>G</step><octave>4</octave></pitch><duration>1</duration></note>
      <note><pitch><step>A</step><octave>4</octave></pitch><duration>1</duration></note>
      <note><pitch><step>B</step><octave>4</octave></pitch><duration>2</duration></note>
    </measure>
    <measure number="2">
      <note><pitch><step>F</step><alter>1</alter><octave>5</octave></pitch><duration>2</duration></note>
      <note><pitch><step>E</step><octave>3</octave></pitch><duration>1</duration></note>
      <note><rest/><duration>1</duration></note>
    </measure>
  </part>
</score-partwise>`;

let server: TestServer;
let teacher: Client;
beforeAll(async () => {
  server = await startTestServer();
  await seedDemo(server.services.db);
  teacher = new Client(server.url);
  await teacher.post("/signin", { email: DEMO_SCHOOL.teachers[0].email, password: DEMO_PASSWORD });
});
afterAll(() => server.close());

function upload(client: Client, name: string, bytes: Uint8Array | string, title = "") {
  const form = new FormData();
  form.set("score", new File([typeof bytes === "string" ? bytes : new Uint8Array(bytes)], name));
  form.set("title", title);
  return client.request("/teach/tunes", { method: "POST", body: form });
}

const stored = () => server.services.db.select().from(tunes).where(eq(tunes.orgId, DEMO_SCHOOL.id));

describe("tune uploads", () => {
  it("stores the melody of a .musicxml file, rests skipped, key applied, and previews it", async () => {
    const res = await upload(teacher, "quay-steps.musicxml", SCORE);
    expect(res.status).toBe(302);
    const [tune] = await stored();
    expect(tune).toMatchObject({ title: "Quay Steps", keyFifths: 1 });
    expect(tune!.notes).toEqual([
      { pitch: "G4", beats: 1, bar: 1, onset: 0, tied: false },
      { pitch: "A4", beats: 1, bar: 1, onset: 1, tied: false },
      { pitch: "B4", beats: 2, bar: 1, onset: 2, tied: false },
      { pitch: "F#5", beats: 2, bar: 2, onset: 4, tied: false },
      { pitch: "E3", beats: 1, bar: 2, onset: 6, tied: false },
    ]);
    // The bars with their meter and key, and the file itself, are kept.
    expect(tune!.score).toMatchObject({ partId: "P1", part: "Guitar", measures: [{ number: "1", beats: 4, beatType: 4, keyFifths: 1 }, { number: "2", start: 4, length: 4 }] });
    expect(new TextDecoder().decode(unzlibSync(tune!.source!))).toBe(SCORE);
    // React separates interpolated text with <!-- --> in server HTML.
    const page = async (q: string) => (await (await teacher.get(`${res.headers.get("location")}?${q}`)).text()).replace(/<!-- -->/g, "");
    // The open low E (written E3) is in first position's reach, not in twelfth.
    expect(await page("position=1")).toContain("Every note of bars 1–2 has a home spot in position 1.");
    const low = await page("position=12");
    expect(low).toContain("1 note falls outside position 12: E3 (bar 2)");
    expect(low).toContain("Read from the part <strong>Guitar</strong>. Nothing was left out.");
  });

  it("lets the teacher read another part of a stored score, and says what was left out", async () => {
    const twoParts = SCORE.replace(
      `<score-part id="P1"><part-name>Guitar</part-name></score-part>`,
      `<score-part id="P1"><part-name>Guitar</part-name></score-part><score-part id="P2"><part-name>Flute</part-name></score-part>`,
    ).replace(
      "</part>\n</score-partwise>",
      `</part><part id="P2"><measure number="1"><attributes><divisions>1</divisions></attributes><note><grace/><pitch><step>B</step><octave>5</octave></pitch></note><note><pitch><step>A</step><octave>5</octave></pitch><duration>4</duration></note></measure></part>\n</score-partwise>`,
    );
    const res = await upload(teacher, "duet.musicxml", twoParts, "Duet");
    const path = res.headers.get("location")!;
    const page = async () => (await (await teacher.get(path)).text()).replace(/<!-- -->/g, "");
    expect(await page()).toContain("Left out of the melody line: the other part: Flute.");
    const chosen = await teacher.request(path, { method: "POST", body: new URLSearchParams({ intent: "part", partId: "P2" }) });
    expect(chosen.status).toBe(302);
    const [tune] = (await stored()).filter((t) => t.title === "Duet");
    expect(tune!.notes).toEqual([{ pitch: "A5", beats: 4, bar: 1, onset: 0, tied: false }]);
    expect(await page()).toContain("Left out of the melody line: 1 grace note; the other part: Guitar.");
    const wrong = await teacher.request(path, { method: "POST", body: new URLSearchParams({ intent: "part", partId: "P7" }) });
    expect((await wrong.text()).replace(/&quot;/g, '"')).toContain('This score has no part "P7". The tune was left as it was.');
  });

  it("keeps the score's tempo marking, and the rhythm pass starts at it", async () => {
    // MusicXML 4.0 <metronome>: half = 50 in 4/4 is 100 quarter notes a minute, the beat the pass counts in 4/4.
    const marked = SCORE.replace(
      "</attributes>",
      "</attributes><direction><direction-type><metronome><beat-unit>half</beat-unit><per-minute>50</per-minute></metronome></direction-type></direction>",
    );
    expect((await upload(teacher, "marked.musicxml", marked, "Quay Steps (marked)")).status).toBe(302);
    const tune = (await stored()).find((t) => t.title === "Quay Steps (marked)")!;
    expect(tune.score?.tempo).toEqual({ quarterBpm: 100, marking: { beatUnit: "half", dots: 0, perMinute: 50 } });
    expect(defaultTempo({ notes: tune.notes, beatsPerBar: tune.beatsPerBar, score: tune.score! })).toBe(100);
  });

  it("asks for a new upload of a tune stored before scores were kept", async () => {
    const id = "old-upload";
    await server.services.db.insert(tunes).values({ id, orgId: DEMO_SCHOOL.id, title: "Old upload", keyFifths: 0, beatsPerBar: 4, notes: [{ pitch: "E4", beats: 1, bar: 1 }] });
    const text = (await (await teacher.get(`/teach/tunes/${id}`)).text()).replace(/&#x27;/g, "'");
    expect(text).toContain("This tune was uploaded before Fretcall kept a score's rests, meters and key changes");
  });

  it("reads a compressed .mxl through META-INF/container.xml", async () => {
    const mxl = zipSync({
      "META-INF/container.xml": strToU8(`<?xml version="1.0"?><container><rootfiles><rootfile full-path="score.musicxml"/></rootfiles></container>`),
      "score.musicxml": strToU8(SCORE),
    });
    expect((await upload(teacher, "quay.mxl", mxl, "Quay Steps (compressed)")).status).toBe(302);
    expect((await stored()).map((t) => t.title)).toContain("Quay Steps (compressed)");
  });

  it.each([
    ["notes.txt", "G4 A4 B4", "is not a MusicXML file"],
    ["broken.musicxml", "<score-partwise><part", "Nothing was saved."],
    ["letter.xml", `<?xml version="1.0"?><letter>hello</letter>`, "is not a MusicXML score"],
    ["silent.musicxml", SCORE.replace(/<note><pitch>.*?<\/note>/gs, ""), "No part of this score has notes to read"],
    ["fake.mxl", zipSync({ "score.musicxml": strToU8(SCORE) }), "container.xml"],
    ["pictures.mxl", zipSync({ "META-INF/container.xml": strToU8(`<container><rootfiles><rootfile full-path="score.pdf"/></rootfiles></container>`), "score.pdf": new Uint8Array(8) }), "but does not contain it"],
    ["line.musicxml", SCORE.replace("<duration>2</duration></note>", "<duration>2</note>"), "not well-formed XML (line 10)"],
    ["entities.musicxml", SCORE.replace("<score-partwise", `<!DOCTYPE score-partwise [<!ENTITY x "&#60;note/&#62;">]><score-partwise`), "declares its own XML entities"],
    ["deep.musicxml", SCORE.replace("<work>", `${"<direction>".repeat(40)}${"</direction>".repeat(40)}<work>`), "more than 32 levels deep"],
  ])("refuses %s with a clear message and stores nothing", async (name, bytes, message) => {
    const before = (await stored()).length;
    const res = await upload(teacher, name, bytes);
    expect(res.status).toBe(200);
    expect((await res.text()).replace(/&#x27;/g, "'")).toContain(message);
    expect((await stored()).length).toBe(before);
  });

  it("refuses an archive that expands too far", async () => {
    const bomb = zipSync({ "META-INF/container.xml": strToU8("x"), "big.xml": new Uint8Array(21 * 1024 * 1024) }, { level: 9 });
    const res = await upload(teacher, "bomb.mxl", bomb);
    expect(await res.text()).toMatch(/unpacks to more than 3 MB/);
  });

  it("answers a 20 MB upload with the limit on the page, not a broken connection", async () => {
    const before = (await stored()).length;
    // The body limit turns it away before the route reads it (server/body-limit.ts).
    const res = await upload(teacher, "huge.musicxml", new Uint8Array(20 * 1024 * 1024).fill(0x20));
    expect(res.status).toBe(413);
    const page = await res.text();
    expect(page).toContain("may hold at most 5 MB");
    expect(page).toContain('href="/teach/tunes"');
    expect((await stored()).length).toBe(before);
  });

  it("is for teachers: students get 403, strangers are sent to sign in", async () => {
    const student = new Client(server.url);
    await student.post("/signin", { email: DEMO_SCHOOL.studentWithSignIn.email, password: DEMO_PASSWORD });
    expect((await student.get("/teach/tunes")).status).toBe(403);
    expect((await upload(student, "x.musicxml", SCORE)).status).toBe(403);
    expect((await new Client(server.url).get("/teach/tunes")).status).toBe(302);
  });
});

describe("a Tune walk over an uploaded tune's bars", () => {
  it("asks the notes of the chosen bars, in order", async () => {
    const saved = await upload(teacher, "walk.musicxml", SCORE, "Walk test");
    const tuneId = saved.headers.get("location")!.split("/").pop()!;
    const res = await teacher.post("/host", {
      intent: "quick",
      mode: "tune-walk",
      position: "1",
      tuning: "standard",
      frets: "15",
      keyFifths: "1",
      accidentals: "key",
      ledgerLines: "on",
      homeOnly: "on",
      prompts: "12",
      seconds: "10",
      teams: "2",
      tuneId,
      fromBar: "2",
      toBar: "2",
      classId: "",
    });
    expect(res.status).toBe(302);
    const roomId = res.headers.get("location")!.split("/").pop()!;
    const [room] = await server.services.db.select().from((await import("~/db/schema")).rooms).where(eq((await import("~/db/schema")).rooms.id, roomId));
    const config = room!.config as { prompts: { written: string }[]; tuneName: string; sheet: { from: number; notes: { pitch: string; bar: number; onset?: number }[]; measures: unknown[] } };
    expect(config.prompts.map((p) => p.written)).toEqual(["F#5", "E3"]);
    expect(config.tuneName).toBe("Walk test");
    // What the stage engraves the melody so far from: the walked notes as written, the score's bars up to the last of them.
    expect(config.sheet).toMatchObject({ from: 2, notes: [{ pitch: "F#5", bar: 2 }, { pitch: "E3", bar: 2 }] });
    expect(config.sheet.notes.every((n) => typeof n.onset === "number")).toBe(true);
    expect(config.sheet.measures).toHaveLength(2);
  });

  it("shows bars with no notes as a message on the form and opens nothing", async () => {
    const saved = await upload(teacher, "empty-bars.musicxml", SCORE, "Empty bars test");
    const tuneId = saved.headers.get("location")!.split("/").pop()!;
    const setup = { intent: "quick", mode: "tune-walk", position: "1", tuning: "standard", frets: "15", keyFifths: "1", accidentals: "key", prompts: "12", seconds: "10", teams: "2", classId: "" };
    const res = await teacher.post("/host", { ...setup, tuneId, fromBar: "40", toBar: "41" });
    expect(res.status).toBe(200);
    expect(await res.text()).toMatch(/From bar[\s\S]{0,600}Bars 40–41 of “Empty bars test” have no notes\./);
  });
});

describe("the tunes JSON API", () => {
  it("lists the built-in tunes and the school's uploads, and gives one with its notes and bars, by cookie or token", async () => {
    const saved = await upload(teacher, "quay-api.musicxml", SCORE, "Quay Steps (API)");
    const tuneId = saved.headers.get("location")!.split("/").pop()!;
    const [rafe] = DEMO_SCHOOL.teachers;
    const { token } = await createApiToken(server.services.db, rafe.id, "tunes probe");
    const bearer = new Client(server.url);
    const get = (path: string) => bearer.request(path, { headers: { Authorization: `Bearer ${token}` } });

    const list = (await (await get("/api/v1/tunes")).json()) as { tunes: { id: string; title: string; builtin: boolean; notes: number; bars: number }[] };
    expect(list.tunes.find((t) => t.id === "lantern-walk")).toMatchObject({ title: "Lantern Walk", builtin: true, notes: 25, bars: 8 });
    expect(list.tunes.find((t) => t.id === tuneId)).toMatchObject({ title: "Quay Steps (API)", builtin: false, notes: 5, bars: 2 });

    const one = await get(`/api/v1/tunes/${tuneId}`);
    expect(one.status).toBe(200);
    expect(one.headers.get("cache-control")).toBe("private, no-store");
    expect(await one.json()).toMatchObject({
      id: tuneId,
      keyFifths: 1,
      part: "Guitar",
      notes: [
        { pitch: "G4", beats: 1, bar: 1, onset: 0, tied: false },
        { pitch: "A4", beats: 1, bar: 1, onset: 1 },
        { pitch: "B4", beats: 2, bar: 1, onset: 2 },
        { pitch: "F#5", beats: 2, bar: 2, onset: 4 },
        { pitch: "E3", beats: 1, bar: 2, onset: 6 },
      ],
      bars: [
        { bar: 1, number: "1", beats: 4, beatType: 4, keyFifths: 1, pickup: false },
        { bar: 2, number: "2", beats: 4, beatType: 4, keyFifths: 1, pickup: false },
      ],
    });
    // A built-in tune has one meter and key throughout.
    const builtin = (await (await teacher.get("/api/v1/tunes/harbour-bells")).json()) as { bars: unknown[]; notes: unknown[] };
    expect(builtin.bars).toHaveLength(8);
    expect(builtin.bars[7]).toEqual({ bar: 8, number: "8", beats: 3, beatType: 4, keyFifths: 1, pickup: false });
    expect(builtin.notes[0]).toEqual({ pitch: "G4", beats: 1, bar: 1, onset: null, tied: false });
  });

  it("answers 404 for no such tune, 403 to a student and 401 to a stranger, in JSON", async () => {
    const missing = await teacher.get("/api/v1/tunes/no-such-tune");
    expect(missing.status).toBe(404);
    expect(await missing.json()).toEqual({ error: "No such tune." });
    const student = new Client(server.url);
    await student.post("/signin", { email: DEMO_SCHOOL.studentWithSignIn.email, password: DEMO_PASSWORD });
    expect((await student.get("/api/v1/tunes")).status).toBe(403);
    expect((await student.get("/api/v1/tunes/lantern-walk")).status).toBe(403);
    const stranger = await new Client(server.url).get("/api/v1/tunes");
    expect(stranger.status).toBe(401);
    expect(await stranger.json()).toEqual({ error: "Sign in first." });
    const badToken = await new Client(server.url).request("/api/v1/tunes/lantern-walk", { headers: { Authorization: "Bearer fcl_not-a-token" } });
    expect(badToken.status).toBe(401);
  });
});
