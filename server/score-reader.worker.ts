/**
 * The score reader's thread: unpacks and parses uploaded MusicXML, so a large or hostile file
 * costs this thread its time, never the event loop that serves live rooms. It loads no native
 * addon (fast-xml-parser and fflate are plain JavaScript), so ending it on a timeout is safe.
 */
import { unzlibSync, zlibSync } from "fflate";
import { parentPort } from "node:worker_threads";
import { parseScoreFile, type Tune } from "~/music/musicxml";
import { MusicError } from "~/music/pitch";
import type { ScoreReply, ScoreRequest } from "./score-reader";

const port = parentPort!;
port.postMessage({ type: "ready" } satisfies ScoreReply);
port.on("message", (m: ScoreRequest) => {
  if (m.type === "close") return port.close();
  let result: { ok: true; score: Tune } | { ok: false; error: string };
  let kept: Uint8Array | undefined;
  try {
    const file = m.kept ? unzlibSync(m.bytes) : m.bytes;
    result = { ok: true, score: parseScoreFile(file, m.partId) };
    kept = m.kept ? m.bytes : zlibSync(file);
  } catch (error) {
    // Anything but the parser's own refusal is a fault in Fretcall; the teacher still gets words.
    if (!(error instanceof MusicError)) console.error("score reader failed", error);
    const message = error instanceof MusicError ? error.message : "Fretcall could not read this file (an error on our side).";
    result = { ok: false, error: message };
  }
  // As JSON text: the main thread takes a string in at once and parses thousands of notes in a few
  // ms, where rebuilding them from a structured clone held the event loop for over 100 ms.
  port.postMessage({ type: "done", id: m.id, json: JSON.stringify(result), kept } satisfies ScoreReply, kept ? [kept.buffer as ArrayBuffer] : []);
});
