import { describe, expect, it } from "vitest";
import { chunkGroupName, type ModuleGraph } from "./chunk-groups";

const APP = "/repo/app";
/** A small module graph: each module with its static importers; route modules are reached through entry facades. */
const importers: Record<string, string[]> = {
  "/repo/app/root.tsx": ["root-entry"],
  "/repo/node_modules/react/index.js": ["/repo/app/root.tsx", "/repo/app/components/Fretboard.tsx", "/rr/entry.client.tsx"],
  "/repo/app/components/AppShell.tsx": ["/repo/app/root.tsx"],
  "/repo/app/routes/live/play.tsx": ["play-entry"],
  "/repo/app/routes/live/join.tsx": ["join-entry"],
  "/repo/app/routes/student/practice.tsx": ["practice-entry"],
  "/repo/app/routes/teacher/tune.tsx": ["tune-entry"],
  "/repo/app/game/messages.ts": ["/repo/app/live/useRoomSocket.ts"],
  "/repo/app/live/useRoomSocket.ts": ["/repo/app/routes/live/play.tsx"],
  "/repo/app/components/Fretboard.tsx": ["/repo/app/routes/live/play.tsx", "/repo/app/routes/student/practice.tsx", "/repo/app/routes/teacher/tune.tsx"],
  "/repo/app/components/ui.tsx": ["/repo/app/routes/live/play.tsx", "/repo/app/routes/student/practice.tsx", "/repo/app/routes/live/join.tsx"],
  "/repo/app/components/tuneRender.ts": [],
  "/repo/app/cycle/a.ts": ["/repo/app/cycle/b.ts", "/repo/app/routes/student/practice.tsx"],
  "/repo/app/cycle/b.ts": ["/repo/app/cycle/a.ts"],
};
const graph: ModuleGraph = {
  staticImporters: (id) => importers[id] ?? [],
  isEntry: (id) => id.endsWith("-entry") || id === "/rr/entry.client.tsx",
};

describe("chunkGroupName", () => {
  it.each([
    ["the root layout", "/repo/app/root.tsx", "shell"],
    ["what the root layout imports", "/repo/app/components/AppShell.tsx", "shell"],
    ["a library the client entry and the layout import, whoever else does", "/repo/node_modules/react/index.js", "shell"],
    ["what every first page needs", "/repo/app/components/ui.tsx", "shell"],
    ["a module of the pad alone, through another", "/repo/app/game/messages.ts", "pad"],
    ["the pad's route module", "/repo/app/routes/live/play.tsx", "pad"],
    ["shared by the pad, practice and a teacher's page", "/repo/app/components/Fretboard.tsx", "pad+practice"],
    ["a teacher's page alone: left to the bundler", "/repo/app/routes/teacher/tune.tsx", null],
    ["only imported lazily: left to the bundler", "/repo/app/components/tuneRender.ts", null],
    ["an entry keeps its own file", "play-entry", null],
    ["an import cycle ends", "/repo/app/cycle/b.ts", "practice"],
  ])("%s", (_, id, name) => {
    expect(chunkGroupName(id, graph, APP)).toBe(name);
  });

  it("reads Windows paths", () => {
    const windows: ModuleGraph = { staticImporters: (id) => (id === "C:\\repo\\app\\x.ts" ? ["C:\\repo\\app\\root.tsx"] : []), isEntry: () => false };
    expect(chunkGroupName("C:\\repo\\app\\x.ts", windows, "C:\\repo\\app")).toBe("shell");
  });
});
