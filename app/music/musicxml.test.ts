import { strToU8, zipSync } from "fflate";
import { describe, expect, it } from "vitest";
import { MAX_DEPTH, MAX_NOTES, MAX_XML_CHARS, parseMusicXml, parseMxl, parseScoreFile } from "./musicxml";
import { MusicError } from "./pitch";

// Hand-written fixtures; the melody is invented for Fretcall.
const score = (measures: string, clef = "<clef><sign>G</sign><line>2</line><clef-octave-change>-1</clef-octave-change></clef>") => `<?xml version="1.0" encoding="UTF-8"?>
<!DOCTYPE score-partwise PUBLIC "-//Recordare//DTD MusicXML 4.0 Partwise//EN" "http://www.musicxml.org/dtds/partwise.dtd">
<score-partwise version="4.0">
  <work><work-title>Lantern Walk &amp; Back</work-title></work>
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part><score-part id="P2"><part-name>Bass</part-name></score-part></part-list>
  <part id="P1">
    <measure number="1">
      <attributes><divisions>2</divisions><key><fifths>1</fifths></key><time><beats>4</beats><beat-type>4</beat-type></time>${clef}</attributes>
      ${measures}
  </part>
  <part id="P2"><measure number="1"><attributes><divisions>1</divisions></attributes><note><pitch><step>C</step><octave>2</octave></pitch><duration>4</duration></note></measure></part>
</score-partwise>`;
const note = (step: string, octave: number, duration: number, extra = "", alter?: number) =>
  `<note>${extra.includes("<chord/>") ? "<chord/>" : ""}<pitch><step>${step}</step>${alter === undefined ? "" : `<alter>${alter}</alter>`}<octave>${octave}</octave></pitch><duration>${duration}</duration>${extra.replace("<chord/>", "")}</note>`;

const LANTERN = score(`
      ${note("G", 3, 2)}
      ${note("F", 3, 2, "", 1)}
      <note><rest/><duration>2</duration></note>
      ${note("G", 3, 2)}
      ${note("B", 3, 2, "<chord/>")}
    </measure>
    <measure number="2">
      ${note("E", 3, 4, '<tie type="start"/><voice>1</voice>')}
      ${note("E", 3, 2, '<tie type="stop"/><voice>1</voice>')}
      ${note("F", 3, 2, "<voice>1</voice><accidental>natural</accidental>", 0)}
      <backup><duration>8</duration></backup>
      ${note("C", 3, 4, "<voice>2</voice>")}
      <forward><duration>0</duration></forward>
      ${note("D", 3, 4, "<voice>2</voice>")}
    </measure>
    <measure number="3">
      <attributes><key><fifths>-1</fifths></key></attributes>
      <note><grace/><pitch><step>A</step><octave>3</octave></pitch></note>
      ${note("B", 3, 8, "", -1)}
    </measure>`);

describe("parseMusicXml", () => {
  it("reads the first part's top line: rests skipped, chord tops, ties merged, lower voices dropped", () => {
    const tune = parseMusicXml(LANTERN);
    expect(tune).toMatchObject({ title: "Lantern Walk & Back", part: "Guitar", bars: 3 });
    expect(tune.notes.map((n) => [n.written, n.bar, n.onset, n.duration, n.keyFifths, n.printedAccidental])).toEqual([
      ["G4", "1", 0, 1, 1, null], // treble-8vb: MusicXML's sounding G3 is the written G4 a guitarist reads
      ["F#4", "1", 1, 1, 1, null], // sharp from the key signature, no sign printed
      ["B4", "1", 3, 1, 1, null], // top of the chord G–B
      ["E4", "2", 4, 3, 1, null], // half tied to a quarter
      ["F4", "2", 7, 1, 1, "natural"], // C3 and D3 of voice 2 sit under held notes
      ["Bb4", "3", 8, 4, -1, null], // grace note skipped; key changed to one flat
    ]);
    expect(tune.notes[5]).toMatchObject({ writtenMidi: 70, barIndex: 2, pitch: { letter: "B", alter: -1, octave: 4 } });
  });

  it("reads pitch as written when the clef has no octave change", () => {
    const tune = parseMusicXml(score(`${note("E", 4, 2)}</measure>`, "<clef><sign>G</sign><line>2</line></clef>"));
    expect(tune.notes.map((n) => n.written)).toEqual(["E4"]);
  });

  it("lets a higher voice take over before a held note ends", () => {
    const tune = parseMusicXml(
      score(`${note("C", 4, 8)}<backup><duration>6</duration></backup><forward><duration>2</duration></forward>${note("G", 4, 2)}</measure>`),
    );
    expect(tune.notes.map((n) => [n.written, n.onset, n.duration])).toEqual([
      ["C5", 0, 2], // cut short where the higher voice enters
      ["G5", 2, 1],
    ]);
  });

  it.each([
    ["<score-partwise><part>", /not well-formed XML \(line 1\)/],
    ["<opus/>", /not a MusicXML score/],
    ['<score-timewise version="4.0"/>', /Timewise MusicXML is not supported/],
    ['<score-partwise version="4.0"><part-list/></score-partwise>', /no parts/],
    [score(`<note><rest/><duration>8</duration></note></measure>`).replace(/<part id="P2">.*<\/part>/, ""), /No part of this score has notes/],
    [score(`${note("E", 4, 2, "", 0.5)}</measure>`), /Bar 1: microtonal alter 0.5/],
    [score(`${note("H", 4, 2)}</measure>`), /Bar 1: the letter must be one of A to G/],
    [score(`${note("E", 12, 2)}</measure>`), /Bar 1: the octave must be/],
    [score(`<backup><duration>2</duration></backup></measure>`), /Bar 1: <backup> goes back past the start/],
    [score(`${note("E", 4, -1)}</measure>`), /Bar 1: duration must be a number of zero or more/],
    [score(`</measure><measure number="2a"><attributes><key><fifths>9</fifths></key></attributes></measure>`), /Bar 2a: A key signature/],
    [LANTERN.replace("<divisions>2</divisions>", ""), /Bar 1: a duration comes before <divisions>/],
    [LANTERN.replace("<note>", "<note>\n<pitch>"), /not well-formed XML \(line 11\)/],
    // Entity declarations are refused before any parsing (XML 1.0 §2.8: the internal subset sits in [ … ]).
    [LANTERN.replace(/<!DOCTYPE[^>]*>/, '<!DOCTYPE score-partwise [<!ENTITY a "aaaa"><!ENTITY b "&a;&a;&a;">]>'), /declares its own XML entities/],
    [LANTERN.replace("<work>", `${"<direction>".repeat(MAX_DEPTH + 1)}${"</direction>".repeat(MAX_DEPTH + 1)}<work>`), new RegExp(`more than ${MAX_DEPTH} levels deep`)],
    [score(`${note("E", 4, 1).repeat(MAX_NOTES + 1)}</measure>`), /more than 5000 notes/],
    [`${LANTERN}<!--${" ".repeat(MAX_XML_CHARS)}-->`, /larger than 3 MB of text/],
  ])("rejects %#", (text, message) => {
    expect(() => parseMusicXml(text)).toThrow(MusicError);
    expect(() => parseMusicXml(text)).toThrow(message);
  });
});

// One part of one or more bars; each feature's fixture below is hand-made MusicXML 4.0.
const part = (id: string, name: string, bars: string) => ({ id, name, bars });
const multi = (...parts: ReturnType<typeof part>[]) => `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <part-list>${parts.map((p) => `<score-part id="${p.id}"><part-name>${p.name}</part-name></score-part>`).join("")}</part-list>
  ${parts.map((p) => `<part id="${p.id}">${p.bars}</part>`).join("\n  ")}
</score-partwise>`;
const line = (tune: ReturnType<typeof parseMusicXml>) => tune.notes.map((n) => [n.written, n.onset, n.duration]);

describe("reading MusicXML 4.0 fully", () => {
  it("cue notes take time in their voice but are not played; grace notes are left out", () => {
    const tune = parseMusicXml(
      multi(
        part("P1", "Guitar", `<measure number="1"><attributes><divisions>2</divisions><time><beats>4</beats><beat-type>4</beat-type></time></attributes>
          ${note("E", 5, 2)}
          <note><cue/><pitch><step>F</step><octave>5</octave></pitch><duration>2</duration></note>
          <note><grace/><pitch><step>A</step><octave>5</octave></pitch></note>
          ${note("G", 5, 4)}
          <backup><duration>8</duration></backup>
          ${note("C", 4, 8, "<voice>2</voice>")}
        </measure>`),
      ),
    );
    // <cue/>: "cue notes … take up time in the measure" (MusicXML 4.0, note element) → G5 starts after it, at beat 2.
    // <grace/>: no <duration>, no time → left out. The <backup> of 8 divisions then lands on the bar line, not before it.
    expect(line(tune)).toEqual([
      ["E5", 0, 1],
      ["G5", 2, 2],
    ]);
    // Voice 2's C4 starts with E5, so it counts as a lower note of a chord.
    expect(tune.leftOut).toEqual({ graceNotes: 1, cueNotes: 1, chordNotes: 1, lowerVoiceNotes: 0, otherParts: [] });
  });

  it("reads a TAB-only part from string, fret and the staff-details tuning, an octave above sounding", () => {
    const tab = `<measure number="1"><attributes><divisions>1</divisions><key><fifths>2</fifths></key><time><beats>2</beats><beat-type>4</beat-type></time>
        <clef><sign>TAB</sign><line>5</line></clef>
        <staff-details><staff-lines>6</staff-lines>${[["D", 2], ["A", 2], ["D", 3], ["G", 3], ["B", 3], ["E", 4]].map(([s, o], i) => `<staff-tuning line="${i + 1}"><tuning-step>${s}</tuning-step><tuning-octave>${o}</tuning-octave></staff-tuning>`).join("")}</staff-details></attributes>
        <note><pitch><step>D</step><octave>2</octave></pitch><duration>1</duration><notations><technical><string>6</string><fret>0</fret></technical></notations></note>
        <note><pitch><step>F</step><alter>1</alter><octave>4</octave></pitch><duration>1</duration><notations><technical><string>1</string><fret>2</fret></technical></notations></note>
      </measure>`;
    // staff-tuning line 1 is the lowest line = string 6 (drop D: D2); string 1 fret 2 sounds F♯4.
    // Guitar is written an octave above sounding, so D2 → written D3 and F♯4 → written F♯5.
    expect(line(parseMusicXml(multi(part("P1", "Guitar TAB", tab))))).toEqual([
      ["D3", 0, 1],
      ["F#5", 1, 1],
    ]);
  });

  it("keeps key and meter changes and a pickup bar", () => {
    const tune = parseMusicXml(
      multi(
        part("P1", "Melody", `<measure number="0" implicit="yes"><attributes><divisions>2</divisions><key><fifths>0</fifths></key><time><beats>3</beats><beat-type>4</beat-type></time></attributes>${note("G", 4, 2)}</measure>
          <measure number="1">${note("C", 5, 6)}</measure>
          <measure number="2"><attributes><key><fifths>2</fifths></key><time><beats>6</beats><beat-type>8</beat-type></time></attributes>${note("F", 5, 3, "", 1)}${note("E", 5, 3)}</measure>
          <measure number="3"><attributes><time symbol="cut"><beats>2</beats><beat-type>2</beat-type></time></attributes>${note("D", 5, 8)}</measure>`),
      ),
    );
    // implicit="yes": a measure not counted as a full bar (a pickup); <time> and <key> hold until changed.
    expect(tune.measures.map((m) => [m.number, m.start, m.length, `${m.beats}/${m.beatType}`, m.keyFifths, m.pickup])).toEqual([
      ["0", 0, 1, "3/4", 0, true],
      ["1", 1, 3, "3/4", 0, false],
      ["2", 4, 3, "6/8", 2, false], // six eighths = 3 quarters
      ["3", 7, 4, "2/2", 2, false],
    ]);
    expect(tune.notes.map((n) => [n.written, n.keyFifths])).toEqual([
      ["G4", 0],
      ["C5", 0],
      ["F#5", 2],
      ["E5", 2],
      ["D5", 2],
    ]);
  });

  it("merges a tie across a bar line into one note to play", () => {
    const tune = parseMusicXml(
      multi(part("P1", "Melody", `<measure number="1"><attributes><divisions>1</divisions></attributes>${note("C", 5, 3)}${note("D", 5, 1, '<tie type="start"/>')}</measure>
        <measure number="2">${note("D", 5, 2, '<tie type="stop"/>')}${note("E", 5, 2)}</measure>`)),
    );
    // <tie type="start"/> … <tie type="stop"/> on the same pitch: one sound lasting both durations.
    expect(tune.notes.map((n) => [n.written, n.bar, n.onset, n.duration, n.tied])).toEqual([
      ["C5", "1", 0, 3, false],
      ["D5", "1", 3, 3, true],
      ["E5", "2", 6, 2, false],
    ]);
  });

  it("with several parts reads the first with notes, or the one asked for, and names the others", () => {
    const rests = part("P1", "Voice", `<measure number="1"><attributes><divisions>1</divisions></attributes><note><rest/><duration>4</duration></note></measure>`);
    const flute = part("P2", "Flute", `<measure number="1"><attributes><divisions>1</divisions></attributes>${note("A", 5, 4)}</measure>`);
    const violin = part("P3", "Violin", `<measure number="1"><attributes><divisions>1</divisions></attributes>${note("E", 5, 2)}${note("D", 5, 2)}</measure>`);
    const text = multi(rests, flute, violin);
    const first = parseMusicXml(text);
    expect([first.partId, first.part, line(first)]).toEqual(["P2", "Flute", [["A5", 0, 4]]]);
    expect(first.parts).toEqual([
      { id: "P1", name: "Voice", notes: 0 },
      { id: "P2", name: "Flute", notes: 1 },
      { id: "P3", name: "Violin", notes: 2 },
    ]);
    expect(first.leftOut.otherParts).toEqual(["Voice", "Violin"]);
    expect(parseMusicXml(text, "P3").notes.map((n) => n.written)).toEqual(["E5", "D5"]);
    expect(() => parseMusicXml(text, "P9")).toThrow(/no part "P9"/);
    expect(() => parseMusicXml(text, "P1")).toThrow(/"Voice" has no notes to read/);
  });

  it("reads a transposing part at concert pitch, and a guitar's octave transposition as written", () => {
    // Clarinet in B♭: <transpose> diatonic −1, chromatic −2 — written E5 in D major sounds D5 in C major.
    const clarinet = part("P1", "Clarinet in B♭", `<measure number="1"><attributes><divisions>1</divisions><key><fifths>2</fifths></key><transpose><diatonic>-1</diatonic><chromatic>-2</chromatic></transpose></attributes>${note("E", 5, 2)}${note("F", 5, 2, "", 1)}</measure>`);
    const tune = parseMusicXml(multi(clarinet));
    expect(tune.notes.map((n) => [n.written, n.keyFifths])).toEqual([
      ["D5", 0],
      ["E5", 0],
    ]);
    // Guitar written in plain treble clef with <transpose> octave-change −1: <pitch> is already the written note.
    const guitar = part("P1", "Guitar", `<measure number="1"><attributes><divisions>1</divisions><transpose><diatonic>0</diatonic><chromatic>0</chromatic><octave-change>-1</octave-change></transpose><clef><sign>G</sign><line>2</line></clef></attributes>${note("E", 4, 4)}</measure>`);
    expect(line(parseMusicXml(multi(guitar)))).toEqual([["E4", 0, 4]]);
  });
});

const CONTAINER = `<?xml version="1.0" encoding="UTF-8"?>
<container><rootfiles><rootfile full-path="score/lantern.musicxml" media-type="application/vnd.recordare.musicxml+xml"/><rootfile full-path="score/lantern.pdf" media-type="application/pdf"/></rootfiles></container>`;
const mxl = (files: Record<string, string | Uint8Array>) =>
  zipSync(Object.fromEntries(Object.entries(files).map(([k, v]) => [k, typeof v === "string" ? strToU8(v) : v])));

describe("parseMxl and parseScoreFile", () => {
  it("finds the score through META-INF/container.xml", () => {
    const bytes = mxl({ mimetype: "application/vnd.recordare.musicxml", "META-INF/container.xml": CONTAINER, "score/lantern.musicxml": LANTERN, "cover.png": new Uint8Array(64) });
    expect(parseMxl(bytes)).toEqual(parseMusicXml(LANTERN));
    expect(parseScoreFile(bytes)).toEqual(parseMusicXml(LANTERN));
    const stored = zipSync({ "META-INF/container.xml": strToU8(CONTAINER), "score/lantern.musicxml": strToU8(LANTERN) }, { level: 0 });
    expect(parseMxl(stored)).toEqual(parseMusicXml(LANTERN));
  });

  it("tells plain MusicXML from .mxl by content", () => {
    expect(parseScoreFile(strToU8(LANTERN)).notes).toHaveLength(6);
  });

  it.each([
    [() => mxl({ "score/lantern.musicxml": LANTERN }), /no META-INF\/container.xml/],
    [() => mxl({ "META-INF/container.xml": CONTAINER }), /names "score\/lantern.musicxml" as its score, but does not contain it/],
    [() => mxl({ "META-INF/container.xml": "<container><rootfiles/></container>" }), /names no score/],
    [() => new Uint8Array([0x50, 0x4b, 0x03, 0x04, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22, 23, 24, 25, 26, 27, 28, 29, 30]), /not a readable zip archive|damaged/],
  ])("rejects a broken archive %#", (make, message) => {
    expect(() => parseScoreFile(make())).toThrow(MusicError);
    expect(() => parseScoreFile(make())).toThrow(message);
  });

  it("refuses an archive that unpacks beyond the limit", () => {
    const bomb = mxl({ "META-INF/container.xml": CONTAINER, "score/lantern.musicxml": `<!--${" ".repeat(MAX_XML_CHARS + 1)}-->` });
    expect(bomb.length).toBeLessThan(100_000);
    expect(() => parseScoreFile(bomb)).toThrow(/unpacks to more than 3 MB/);
  });

  it("rejects empty, oversized and non-UTF-8 files", () => {
    expect(() => parseScoreFile(new Uint8Array(0))).toThrow(/empty/);
    expect(() => parseScoreFile(new Uint8Array(MAX_XML_CHARS + 1))).toThrow(/at most 3 MB/);
    expect(() => parseScoreFile(new Uint8Array([0x3c, 0xff, 0xfe, 0xfd]))).toThrow(/not valid UTF-8 text/);
  });
});
