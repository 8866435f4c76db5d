import { Link, redirect } from "react-router";
import { getOptionalUser } from "~/auth/guards.server";
import { homeFor } from "~/auth/session.server";
import { buttonClass, Card } from "~/components/ui";
import type { Route } from "./+types/home";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await getOptionalUser(request, context);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

const steps = [
  { title: "Pick a position", text: "Fifth position, say: index finger at fret 5. Every written note gets one home spot there." },
  { title: "Play a round together", text: "The stage shows a note; the whole class races to tap its home spot on their phones." },
  { title: "See who's stuck", text: "Note by note, the class review shows which pitches need reteaching, and why." },
];

export default function Home() {
  return (
    <div className="space-y-10">
      <section className="grid items-center gap-8 rounded-[2rem] bg-rosewood p-8 text-paper md:grid-cols-2 md:p-12">
        <div>
          <h1 className="font-display text-4xl font-semibold leading-tight md:text-5xl">
            Read the note. <span className="text-brass">Find the fret.</span>
          </h1>
          <p className="mt-4 text-xl text-paper/85">
            Fretcall turns a group guitar class into confident sight-readers: one home spot for every written pitch,
            drilled together in live rounds and alone between lessons.
          </p>
          <div className="mt-6 flex flex-wrap gap-3">
            <Link to="/signup" className={buttonClass("brass")}>Start a studio</Link>
            <Link to="/explore" className={buttonClass("ghost", "border-paper/40 text-paper hover:bg-white/10")}>
              Explore the neck
            </Link>
          </div>
        </div>
        <svg viewBox="0 0 320 140" role="img" aria-label="A written note and its home spot on a fretboard" className="w-full">
          <rect x="0" y="30" width="320" height="90" rx="10" fill="#2a1512" />
          {[60, 120, 175, 225, 270].map((x) => (
            <line key={x} x1={x} y1="30" x2={x} y2="120" stroke="#d9a441" strokeWidth="4" />
          ))}
          {[42, 57, 72, 87, 102, 117].map((y, i) => (
            <line key={y} x1="0" y1={y - 5} x2="320" y2={y - 5} stroke="#f7efe1" strokeWidth={0.8 + i * 0.35} opacity="0.85" />
          ))}
          <circle cx="147" cy="67" r="11" fill="#1f9e89" stroke="#f7efe1" strokeWidth="2" />
          <text x="147" y="72" textAnchor="middle" fontSize="14" fill="white">✓</text>
        </svg>
      </section>
      <section className="grid gap-4 md:grid-cols-3">
        {steps.map((s, i) => (
          <Card key={s.title}>
            <p className="font-display text-brass text-xl font-semibold">{i + 1}</p>
            <h2 className="font-display text-2xl font-semibold">{s.title}</h2>
            <p className="mt-2 text-ink-soft">{s.text}</p>
          </Card>
        ))}
      </section>
    </div>
  );
}
