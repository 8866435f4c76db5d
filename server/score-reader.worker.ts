/**
 * The score reader's thread: unpacks and parses uploaded MusicXML, so a large or hostile file
 * costs this thread its time, never the event loop that serves live rooms. It loads no native
 * addon (fast-xml-parser and fflate are plain JavaScript), so ending it on a timeout is safe.
 */
import { parentPort } from "node:worker_threads";
import { parseScoreFile, type ScoreReading } from "~/music/musicxml";
import { MusicError } from "~/music/pitch";
import type { ScoreReply, ScoreRequest } from "./score-reader";

const port = parentPort!;
port.postMessage({ type: "ready" } satisfies ScoreReply);
port.on("message", (m: ScoreRequest) => {
  if (m.type === "close") return port.close();
  let result: ScoreReading;
  try {
    result = { ok: true, score: parseScoreFile(m.bytes, m.partId) };
  } catch (error) {
    // Anything but the parser's own refusal is a fault in Fretcall; the teacher still gets words.
    if (!(error instanceof MusicError)) console.error("score reader failed", error);
    const message = error instanceof MusicError ? error.message : "Fretcall could not read this file (an error on our side).";
    result = { ok: false, error: message };
  }
  // As JSON text: the main thread takes a string in at once and parses thousands of notes in a few
  // ms, where rebuilding them from a structured clone held the event loop for over 100 ms.
  port.postMessage({ type: "done", id: m.id, json: JSON.stringify(result) } satisfies ScoreReply);
});
