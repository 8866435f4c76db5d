import { describe, expect, it } from "vitest";
import { parseMusicXml } from "./musicxml";
import { readTempo, tempoInBeat, unitQuarters } from "./tempo";

describe("unitQuarters", () => {
  // MusicXML 4.0 note-type-value names; a dot adds half the note's value, a second dot half of that
  // (common practice, no source).
  it.each([
    ["whole", 0, 4],
    ["half", 0, 2],
    ["half", 1, 3],
    ["quarter", 0, 1],
    ["quarter", 1, 1.5],
    ["quarter", 2, 1.75],
    ["eighth", 0, 0.5],
    ["eighth", 1, 0.75],
    ["16th", 0, 0.25],
    ["breve", 0, 8],
  ])("%s with %i dots is %f quarters", (unit, dots, quarters) => {
    expect(unitQuarters(unit, dots)).toBe(quarters);
  });
  it("knows no other unit", () => {
    expect(unitQuarters("crotchet")).toBeNull();
    expect(unitQuarters("quarter", -1)).toBeNull();
  });
});

describe("readTempo", () => {
  it.each([
    // MusicXML 4.0 <sound tempo>: quarter notes per minute, whatever the meter.
    [{ soundTempo: "96" }, { quarterBpm: 96, marking: null }],
    // <metronome>: per-minute counts the beat-unit, dotted by each <beat-unit-dot/>.
    [{ beatUnit: "quarter", dots: 1, perMinute: "60" }, { quarterBpm: 90, marking: { beatUnit: "quarter", dots: 1, perMinute: 60 } }],
    [{ beatUnit: "half", perMinute: "60" }, { quarterBpm: 120, marking: { beatUnit: "half", dots: 0, perMinute: 60 } }],
    // <per-minute> may be text with a number in it.
    [{ beatUnit: "quarter", perMinute: "c. 108" }, { quarterBpm: 108, marking: { beatUnit: "quarter", dots: 0, perMinute: 108 } }],
    // Both: the sound's value is what is heard; the metronome is how it is printed.
    [{ beatUnit: "quarter", perMinute: "100", soundTempo: "101.5" }, { quarterBpm: 101.5, marking: { beatUnit: "quarter", dots: 0, perMinute: 100 } }],
  ])("%o", (input, tempo) => {
    expect(readTempo(input)).toEqual(tempo);
  });
  it.each([
    [{}],
    // A metric modulation (beat unit = beat unit) has no per-minute.
    [{ beatUnit: "quarter" }],
    // MusicXML 4.0: tempo="0" asks the player for a tempo.
    [{ soundTempo: "0" }],
    [{ soundTempo: "fast" }],
    [{ beatUnit: "crotchet", perMinute: "80" }],
  ])("no tempo in %o", (input) => {
    expect(readTempo(input)).toBeNull();
  });
  it("counts a tempo in a meter's beat", () => {
    expect(tempoInBeat({ quarterBpm: 90, marking: null }, 1.5)).toBe(60);
  });
});

// Hand-written MusicXML 4.0 fixtures; the melody is invented for Fretcall.
const score = (directions: string, time = "<beats>6</beats><beat-type>8</beat-type>", secondPart = "") => `<?xml version="1.0" encoding="UTF-8"?>
<score-partwise version="4.0">
  <part-list><score-part id="P1"><part-name>Guitar</part-name></score-part>${secondPart ? '<score-part id="P2"><part-name>Voice</part-name></score-part>' : ""}</part-list>
  <part id="P1">
    <measure number="1">
      <attributes><divisions>2</divisions><time>${time}</time></attributes>
      ${directions}
      <note><pitch><step>G</step><octave>4</octave></pitch><duration>3</duration></note>
      <note><pitch><step>A</step><octave>4</octave></pitch><duration>3</duration></note>
    </measure>
    <measure number="2">
      <direction><sound tempo="40"/></direction>
      <note><pitch><step>B</step><octave>4</octave></pitch><duration>6</duration></note>
    </measure>
  </part>
  ${secondPart}
</score-partwise>`;

describe("tempo in a MusicXML score", () => {
  it("reads a metronome marking with its dotted beat unit and the sound's tempo", () => {
    const tune = parseMusicXml(
      score(`<direction placement="above"><direction-type><metronome><beat-unit>quarter</beat-unit><beat-unit-dot/><per-minute>60</per-minute></metronome></direction-type><sound tempo="90"/></direction>`),
    );
    expect(tune.tempo).toEqual({ quarterBpm: 90, marking: { beatUnit: "quarter", dots: 1, perMinute: 60 } });
  });

  it("reads a <sound tempo> alone, also one written directly in the measure", () => {
    expect(parseMusicXml(score(`<direction><direction-type><words>Moderato</words></direction-type><sound tempo="112"/></direction>`)).tempo).toEqual({ quarterBpm: 112, marking: null });
    expect(parseMusicXml(score(`<sound tempo="76"/>`)).tempo).toEqual({ quarterBpm: 76, marking: null });
  });

  it("keeps the first tempo (later changes are not followed) and gives null when none is marked", () => {
    // Bar 2's tempo="40" is the only one in this score.
    expect(parseMusicXml(score("")).tempo).toEqual({ quarterBpm: 40, marking: null });
    expect(parseMusicXml(score("").replace('<direction><sound tempo="40"/></direction>', "")).tempo).toBeNull();
  });

  it("finds a tempo written only in another part", () => {
    const voice = `<part id="P2"><measure number="1"><attributes><divisions>1</divisions></attributes><direction><direction-type><metronome><beat-unit>half</beat-unit><per-minute>50</per-minute></metronome></direction-type></direction><note><rest/><duration>3</duration></note></measure></part>`;
    const tune = parseMusicXml(score("", undefined, voice).replace('<direction><sound tempo="40"/></direction>', ""));
    expect(tune.partId).toBe("P1");
    expect(tune.tempo).toEqual({ quarterBpm: 100, marking: { beatUnit: "half", dots: 0, perMinute: 50 } });
  });
});
