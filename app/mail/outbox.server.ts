import { readdir, readFile } from "node:fs/promises";
import { join } from "node:path";

/** A message captured by the local SMTP catcher, as written to MAIL_DIR. */
export interface CapturedMail {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
}

/** Newest first. Reads the files the catcher wrote, so every process (server, tests) sees the same outbox. */
export async function readOutbox(dir: string): Promise<CapturedMail[]> {
  let names: string[];
  try {
    names = (await readdir(dir)).filter((n) => n.endsWith(".json"));
  } catch {
    return [];
  }
  const mails = await Promise.all(
    names.map(async (n) => JSON.parse(await readFile(join(dir, n), "utf8")) as CapturedMail),
  );
  return mails.sort((a, b) => b.receivedAt.localeCompare(a.receivedAt) || b.id.localeCompare(a.id));
}
