// The school's note naming: read for every page it renders and for its e-mails, changed by its admin.
import { eq } from "drizzle-orm";
import type { Db } from "~/db/client.server";
import { organisations } from "~/db/schema";
import { DEFAULT_NAMING, type NoteNaming } from "~/music/naming";

export async function schoolNaming(db: Db, orgId: string): Promise<NoteNaming> {
  const [row] = await db.select({ naming: organisations.noteNaming }).from(organisations).where(eq(organisations.id, orgId));
  return row?.naming ?? DEFAULT_NAMING;
}

export async function setSchoolNaming(db: Db, orgId: string, naming: NoteNaming): Promise<void> {
  await db.update(organisations).set({ noteNaming: naming }).where(eq(organisations.id, orgId));
}
