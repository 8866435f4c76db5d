import { readdir, readFile } from "node:fs/promises";
import { join } from "node:path";

/** A message captured by the local SMTP catcher, as written to MAIL_DIR. */
export interface CapturedMail {
  id: string;
  receivedAt: string;
  /** The school the message was sent for (its header), or null for system mail. */
  school: string | null;
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

/** What one school's admin may see: mail sent for their school, never system mail or another school's. */
export async function schoolOutbox(dir: string, orgId: string): Promise<CapturedMail[]> {
  return (await readOutbox(dir)).filter((m) => m.school === orgId);
}
