import { Form, Link, redirect, useNavigation } from "react-router";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, Card, Field, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { FILE_TOO_BIG, MAX_FILE_BYTES } from "~/music/musicxml";
import { saveUploadedTune, tunesFor } from "~/tunes/tunes.server";
import type { Route } from "./+types/tunes";
import { plural } from "~/lib/plural";

export const meta: Route.MetaFunction = () => [{ title: "Tunes · Fretcall" }];

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const list = await tunesFor(services(context).db, user.orgId);
  return {
    tunes: list.map((t) => ({ id: t.id, title: t.title, builtin: t.builtin, notes: t.notes.length, bars: t.notes.at(-1)?.bar ?? 0 })),
  };
}

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  // Refuse an oversized upload before reading it into memory (Node drains the rest, so the browser gets this page).
  const declared = Number(request.headers.get("Content-Length") ?? 0);
  if (declared > MAX_FILE_BYTES + 64 * 1024) return { error: `${FILE_TOO_BIG} Nothing was saved.` };
  const form = await request.formData();
  const file = form.get("score");
  if (!(file instanceof File) || file.size === 0) return { error: "Choose a MusicXML file (.musicxml, .xml or .mxl)." };
  if (!/\.(musicxml|xml|mxl)$/i.test(file.name)) return { error: `“${file.name}” is not a MusicXML file: use .musicxml, .xml or .mxl.` };
  if (file.size > MAX_FILE_BYTES) return { error: `${file.name}: ${FILE_TOO_BIG} Nothing was saved.` };
  const { db, readScore } = services(context);
  const saved = await saveUploadedTune(db, readScore, user, new Uint8Array(await file.arrayBuffer()), String(form.get("title") ?? ""));
  if (!saved.ok) return { error: `${file.name}: ${saved.error} Nothing was saved.` };
  return redirect(`/teach/tunes/${saved.id}`);
}

export default function Tunes({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <PageTitle lead="Melodies for Tune walks and rhythm passes. Upload a score as MusicXML — Fretcall reads the top line of the first part with notes, and says what it left out; another part can be chosen on the tune's page.">Tunes</PageTitle>
      <Card>
        <Form method="post" encType="multipart/form-data" className="space-y-4" noValidate>
          {actionData?.error ? <Notice tone="error">{actionData.error}</Notice> : null}
          <Field label="MusicXML file" name="score" type="file" accept=".musicxml,.xml,.mxl,application/vnd.recordare.musicxml+xml,application/vnd.recordare.musicxml" required />
          <Field label="Title (optional)" name="title" maxLength={80} hint="Left empty, the score's own title is used." />
          <Button type="submit" disabled={busy}>
            {busy ? "Reading the score…" : "Upload tune"}
          </Button>
        </Form>
      </Card>
      <Card>
        <ul className="divide-y divide-ink/10">
          {loaderData.tunes.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <Link to={`/teach/tunes/${t.id}`} className="font-medium underline">
                {t.title}
              </Link>
              <span className="text-ink-soft">
                {`${plural(t.notes, "note")} · ${plural(t.bars, "bar")} · ${t.builtin ? "built in" : "uploaded"}`}
              </span>
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
