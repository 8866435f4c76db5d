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
    [score(`<note><rest/><duration>8</duration></note></measure>`), /no notes to read/],
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
