// One page of a class's rounds for the class review's table: a class plays rounds week after week,
// so the list is sorted, filtered and cut to a page in SQL rather than sent whole to the browser.
import { and, asc, count, desc, eq, like, sql, type SQL } from "drizzle-orm";
import type { TableQuery } from "~/components/dataTable";
import type { Db } from "~/db/client.server";
import { answers, roomPlayers, rooms } from "~/db/schema";

const players = sql<number>`(select count(*) from ${roomPlayers} where ${roomPlayers.roomId} = ${rooms.id})`;
const answered = sql<number>`(select count(*) from ${answers} where ${answers.roomId} = ${rooms.id})`;

/** What the table may be sorted by, as named in the URL. */
const ORDER = {
  startedAt: rooms.createdAt,
  title: sql`${rooms.title} collate nocase`,
  players,
  answers: answered,
} satisfies Record<string, unknown>;

export const ROUND_SORT_KEYS = Object.keys(ORDER) as (keyof typeof ORDER)[];

export interface RoundRow {
  id: string;
  title: string;
  startedAt: number;
  live: boolean;
  players: number;
  answers: number;
}

/** `%` and `_` in what the teacher typed are matched as themselves. */
const contains = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export async function roundsPage(db: Db, classId: string, query: TableQuery): Promise<{ rows: RoundRow[]; total: number }> {
  const where: SQL = query.q ? and(eq(rooms.classId, classId), sql`${like(rooms.title, contains(query.q))} escape '\\'`)! : eq(rooms.classId, classId);
  const [{ total } = { total: 0 }] = await db.select({ total: count() }).from(rooms).where(where);
  // A page past the end shows the last page, as the table's own footer will say.
  const page = Math.min(query.page, Math.max(1, Math.ceil(total / query.size)));
  const by = ORDER[query.sort.key as keyof typeof ORDER] ?? ORDER.startedAt;
  const rows = await db
    .select({ id: rooms.id, title: rooms.title, createdAt: rooms.createdAt, endedAt: rooms.endedAt, players, answers: answered })
    .from(rooms)
    .where(where)
    .orderBy(query.sort.direction === "asc" ? asc(by) : desc(by), desc(rooms.createdAt), asc(rooms.id))
    .limit(query.size)
    .offset((page - 1) * query.size);
  return {
    rows: rows.map((r) => ({ id: r.id, title: r.title, startedAt: r.createdAt.getTime(), live: r.endedAt === null, players: Number(r.players), answers: Number(r.answers) })),
    total,
  };
}
