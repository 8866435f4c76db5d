import { data, Form, Link } from "react-router";
import { requireRound } from "~/auth/access.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { buttonClass, Card, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { Icon } from "~/live/parts";
import { roundResults } from "~/rooms/results.server";
import { noteName, pct, secs } from "~/review/format";
import { useNoteNaming } from "~/components/NoteNaming";
import { roomSetup } from "~/rooms/rooms.server";
import type { Route } from "./+types/results";

export const meta: Route.MetaFunction = () => [{ title: "Round results · Fretcall" }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db } = services(context);
  const room = await requireRound(db, user, params.roomId);
  const results = await roundResults(db, room.id);
  if (!results) throw data({ error: "No such round." }, { status: 404 });
  // Same settings, same reading set, a new draw: one click for the next class.
  const canHostAgain = roomSetup(room) !== undefined;
  return { room: { id: room.id, title: room.title, createdAt: room.createdAt.toISOString() }, canHostAgain, ...results };
}

export default function Results({ loaderData: r }: Route.ComponentProps) {
  const naming = useNoteNaming();
  return (
    <div className="space-y-6">
      <PageTitle lead={`${new Date(r.room.createdAt).toLocaleString()}${r.tuneName ? ` · tune: ${r.tuneName}` : ""}${r.phase === "ended" ? "" : " · still running"}`}>
        {r.room.title}
      </PageTitle>
      <div className="grid gap-6 lg:grid-cols-2">
        <Card>
          <h2 className="font-display text-2xl font-semibold">By points</h2>
          <table className="mt-3 w-full text-left">
            <thead className="text-sm text-ink-soft">
              <tr>
                <th className="py-1">#</th>
                <th>Player</th>
                <th className="text-right">Points</th>
                <th className="text-right">Right</th>
                <th className="text-right">Median time</th>
              </tr>
            </thead>
            <tbody>
              {r.byPoints.map((s, i) => (
                <tr key={s.key} className="border-t border-ink/10">
                  <td className="py-2">{i + 1}</td>
                  <td>{s.nickname}</td>
                  <td className="text-right font-semibold">{s.points}</td>
                  <td className="text-right">
                    {s.correct}/{s.answered} ({pct(s.accuracy)})
                  </td>
                  <td className="text-right">{secs(s.medianMs)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </Card>
        <Card>
          <h2 className="font-display text-2xl font-semibold">Longest streaks</h2>
          <ol className="mt-3 space-y-1">
            {r.byStreak.map((s) => (
              <li key={s.key} className="flex justify-between border-t border-ink/10 py-2">
                <span>{s.nickname}</span>
                <span className="font-semibold">
                  <Icon name="streak" className="mr-1 h-[1em] w-[1em] text-brass" />
                  {s.longestStreak} in a row
                </span>
              </li>
            ))}
          </ol>
        </Card>
      </div>
      <Card>
        <h2 className="font-display text-2xl font-semibold">Note by note</h2>
        <table className="mt-3 w-full text-left">
          <thead className="text-sm text-ink-soft">
            <tr>
              <th className="py-1">Prompt</th>
              <th>Note</th>
              <th className="text-right">Right</th>
              <th className="pl-4">Mistakes</th>
            </tr>
          </thead>
          <tbody>
            {r.prompts.map((p) => (
              <tr key={p.index} className="border-t border-ink/10 align-top">
                <td className="py-2">{p.index + 1}</td>
                <td className="font-semibold">{noteName(p.written, naming)}</td>
                <td className="text-right">
                  {p.right}/{p.answered}
                </td>
                <td className="pl-4 text-sm">
                  {Object.entries(p.kinds)
                    .filter(([k]) => k !== "home-spot")
                    .map(([k, n]) => `${r.labels[k as keyof typeof r.labels]} × ${n}`)
                    .join(" · ") || "—"}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </Card>
      <div className="flex flex-wrap gap-3">
        {r.canHostAgain ? (
          <Form method="post" action="/host">
            <input type="hidden" name="intent" value="again" />
            <input type="hidden" name="roomId" value={r.room.id} />
            <button type="submit" className={buttonClass("teal")}>
              <Icon name="again" className="h-5 w-5" /> Host this again
            </button>
          </Form>
        ) : null}
        <Link to="/host" className={buttonClass("ghost")}>
          Host another round
        </Link>
      </div>
    </div>
  );
}
