// The detector's own thread: pitch analysis never runs on the page's main thread or the audio thread.
import { NoteDetector } from "./detector";
import type { FromDetector, SampleBlock, ToDetector } from "./messages";

// The live meter and pitch readout need no more than about 20 updates a second.
const STATE_EVERY_MS = 50;

let detector: NoteDetector | null = null;
let frames: MessagePort | null = null;
let lastStateMs = Number.NEGATIVE_INFINITY;

function send(message: FromDetector) {
  globalThis.postMessage(message);
}

globalThis.onmessage = (event: MessageEvent<ToDetector>) => {
  const message = event.data;
  frames?.close();
  frames = null;
  detector = null;
  if (message.type !== "start") return;
  const sampleRate = message.sampleRate;
  const own = new NoteDetector({ sampleRate });
  detector = own;
  frames = message.frames;
  frames.onmessage = (block: MessageEvent<SampleBlock>) => {
    if (detector !== own) return;
    const startMs = (block.data.frame * 1000) / sampleRate;
    for (const note of own.push(block.data.samples, startMs)) send({ type: "note", note });
    if (startMs - lastStateMs >= STATE_EVERY_MS) {
      lastStateMs = startMs;
      send({ type: "state", level: own.level, current: own.current });
    }
  };
};
