// A Chromium of its own whose fake microphone plays a WAV file the test writes (Chromium loops the file),
// with the suite's executable and flags: what the play-mode and played-rhythm tests listen to.
import { mkdirSync, writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { chromium } from "@playwright/test";
import { encodeWav } from "~/listen/synth";
import config from "../../playwright.config";

export function launchWithMicrophone(name: string, samples: Float32Array, sampleRate: number, extraArgs: string[] = []) {
  mkdirSync("tests/.tmp", { recursive: true });
  const file = resolve(`tests/.tmp/${name}.wav`);
  writeFileSync(file, encodeWav(samples, sampleRate));
  const { executablePath, args = [] } = config.use!.launchOptions!;
  return chromium.launch({
    executablePath,
    args: [...args, "--use-fake-device-for-media-stream", "--use-fake-ui-for-media-stream", `--use-file-for-fake-audio-capture=${file}`, ...extraArgs],
  });
}
