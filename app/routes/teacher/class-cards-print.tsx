import { networkInterfaces } from "node:os";
import QRCode from "qrcode";
import { Link } from "react-router";
import { z } from "zod";
import { requireClassTeacher } from "~/auth/access.server";
import { issueCards } from "~/auth/cards.server";
import { requireUserWithRole } from "~/auth/guards.server";
import { Button, Notice, PageTitle } from "~/components/ui";
import { services } from "~/context";
import { joinAddress, joinAddressNote } from "~/lib/joinAddress";
import type { Route } from "./+types/class-cards-print";
import { plural } from "~/lib/plural";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sign-in cards · ${data?.cls.name ?? "Class"} · Fretcall` }];

// The sheet exists only as the answer to issuing cards: the codes are shown once and never kept.
export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const cls = await requireClassTeacher(services(context).db, user, params.classId);
  return { cls: { id: cls.id, name: cls.name } };
}

const issueSchema = z.array(z.string().min(1).max(40)).max(200);
const CARDS_PER_PAGE = 10;

export async function action({ request, params, context }: Route.ActionArgs) {
  const user = await requireUserWithRole(request, context, ["teacher"]);
  const { db, env } = services(context);
  const cls = await requireClassTeacher(db, user, params.classId);
  const ids = issueSchema.safeParse((await request.formData()).getAll("student"));
  if (!ids.success || ids.data.length === 0) return { error: "Tick at least one student to print a card for.", cards: [], pages: [] };
  const issued = await issueCards(db, env.SESSION_SECRET, cls.id, ids.data, user.id);
  if (!issued.length) return { error: "None of the ticked students is in this class any more.", cards: [], pages: [] };
  // The same address the stage's join link uses, so a card scanned in class opens where the phones can reach.
  const address = joinAddress({ publicUrl: env.publicUrlSet ? env.PUBLIC_URL : undefined, requestUrl: request.url, interfaces: networkInterfaces() });
  const cards = await Promise.all(
    issued.map(async (card) => {
      const url = `${address.origin}/card/${card.token}`;
      return {
        userId: card.userId,
        name: card.displayName,
        code: card.code,
        url,
        qr: await QRCode.toString(url, { type: "svg", margin: 0, errorCorrectionLevel: "M", color: { dark: "#1f2a36", light: "#ffffff" } }),
      };
    }),
  );
  const pages = Array.from({ length: Math.ceil(cards.length / CARDS_PER_PAGE) }, (_, i) => cards.slice(i * CARDS_PER_PAGE, (i + 1) * CARDS_PER_PAGE));
  return { error: null, cards, pages, joinCode: cls.joinCode, host: new URL(address.origin).host, note: joinAddressNote(address) };
}

export default function PrintCards({ loaderData, actionData }: Route.ComponentProps) {
  const { cls } = loaderData;
  const back = `/teach/classes/${cls.id}/cards`;
  if (!actionData?.pages.length) {
    return (
      <div className="mx-auto max-w-2xl space-y-4">
        <PageTitle>Sign-in cards for {cls.name}</PageTitle>
        <Notice tone={actionData?.error ? "error" : "info"}>
          {actionData?.error ?? "Cards are printed right after they are issued, and their codes are shown only once."}{" "}
          <Link to={back} className="underline">Choose the students on the sign-in cards page.</Link>
        </Notice>
      </div>
    );
  }
  const { pages, cards, joinCode, host, note } = actionData;
  return (
    <div>
      <div className="no-print mb-6 space-y-3">
        <PageTitle lead={`${plural(cards.length, "card")} on ${plural(pages.length, "page")}, ten a page (A4 or Letter). Cut along the dashed lines.`}>
          Sign-in cards for {cls.name}
        </PageTitle>
        <Notice tone="info">
          Print this sheet now: the codes are shown only this once. A card that is lost can be replaced from the{" "}
          <Link to={back} className="underline">sign-in cards page</Link>; the old one then stops working. {note}
        </Notice>
        <Button type="button" onClick={() => window.print()}>
          Print the cards
        </Button>
      </div>
      {pages.map((page, i) => (
        <section key={i} className="card-sheet mb-6 grid w-fit grid-cols-1 sm:grid-cols-2 print:mb-0" aria-label={`Page ${i + 1} of the sign-in cards`}>
          {page.map((card) => (
            <article
              key={card.userId}
              data-card-url={card.url}
              className="flex h-[50mm] w-[90mm] gap-[3mm] overflow-hidden border border-dashed border-ink/50 bg-white p-[3mm] text-ink [break-inside:avoid]"
            >
              <div className="h-[30mm] w-[30mm] shrink-0" role="img" aria-label={`QR code that signs ${card.name} in`} dangerouslySetInnerHTML={{ __html: card.qr }} />
              <div className="flex min-w-0 flex-col text-[8pt] leading-tight">
                <p className="font-display text-[7pt] uppercase tracking-wide text-ink-soft">Fretcall sign-in card</p>
                <h2 className="truncate font-display text-[13pt] font-semibold">{card.name}</h2>
                <p className="truncate">{cls.name}</p>
                <p className="mt-[1.5mm]">
                  Scan the code, or open <strong>{host}/signin</strong> and type:
                </p>
                <dl className="mt-[1mm] grid grid-cols-[auto_1fr] gap-x-[2mm]">
                  <dt>Class code</dt>
                  <dd className="font-mono text-[10pt] font-semibold tracking-wider" data-class-code>
                    {joinCode}
                  </dd>
                  <dt>Personal code</dt>
                  <dd className="font-mono text-[10pt] font-semibold tracking-wider" data-personal-code>
                    {card.code}
                  </dd>
                </dl>
                <p className="mt-auto text-[6.5pt] text-ink-soft">Keep it to yourself. Lost it? Your teacher can make a new one.</p>
              </div>
            </article>
          ))}
        </section>
      ))}
    </div>
  );
}
