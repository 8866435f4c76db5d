import { Form, Link, NavLink, useMatches } from "react-router";
import type { Role } from "~/db/schema";
import { Icon } from "./Icon";

interface ShellUser {
  displayName: string;
  role: Role;
}

const navFor: Record<Role, { to: string; label: string }[]> = {
  admin: [
    { to: "/admin", label: "School" },
    { to: "/teach", label: "Teach" },
    // A studio's admin teaches too.
    { to: "/host", label: "Host a round" },
    { to: "/teach/sets", label: "Reading sets" },
    { to: "/explore", label: "Neck explorer" },
  ],
  teacher: [
    { to: "/teach", label: "Teach" },
    { to: "/host", label: "Host a round" },
    { to: "/teach/sets", label: "Reading sets" },
    { to: "/explore", label: "Neck explorer" },
  ],
  student: [
    { to: "/me", label: "My practice" },
    { to: "/join", label: "Join a round" },
    { to: "/explore", label: "Neck explorer" },
  ],
};

/** The brand mark: three brass frets crossed by strings, one teal fingertip. */
export function BrandMark({ className = "h-8 w-8" }: { className?: string }) {
  return <img src="/favicon.svg" alt="" aria-hidden="true" className={className} />;
}

/** Routes that export `handle = IMMERSIVE` (the stage, the pad) get the whole screen: a slim bar, no menu. */
export const IMMERSIVE = { immersive: true } as const;
const isImmersive = (handle: unknown) => (handle as Partial<typeof IMMERSIVE> | undefined)?.immersive === true;

export function AppShell({
  user,
  showOutbox,
  children,
}: {
  user: ShellUser | null;
  showOutbox: boolean;
  children: React.ReactNode;
}) {
  const immersive = useMatches().some((m) => isImmersive(m.handle));
  if (immersive) {
    return (
      <div className="flex min-h-dvh flex-col">
        {/* A phone on its side needs the height for the neck more than for the brand. */}
        <header className="no-print border-b-4 border-brass bg-rosewood px-3 py-1 text-paper [@media(max-height:500px)]:hidden">
          <Link to="/" className="inline-flex items-center gap-2 font-display text-lg font-semibold tracking-wide">
            <BrandMark className="h-6 w-6" />
            Fretcall
          </Link>
        </header>
        <main className="w-full flex-1 px-3 py-3 sm:px-5">{children}</main>
      </div>
    );
  }
  const links = user
    ? navFor[user.role]
    : [
        { to: "/join", label: "Join a round" },
        { to: "/explore", label: "Neck explorer" },
      ];
  return (
    <div className="flex min-h-dvh flex-col">
      <header className="no-print border-b-4 border-brass bg-rosewood text-paper">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-3 py-1.5 sm:px-4 sm:py-3">
          <Link to="/" className="flex items-center gap-2 font-display text-xl font-semibold tracking-wide sm:text-2xl">
            <BrandMark className="h-7 w-7 sm:h-8 sm:w-8" />
            Fretcall
          </Link>
          {/* On a phone the menu folds behind one button (a checkbox, so it opens without JavaScript too), leaving the height to the page. */}
          <input id="app-menu" type="checkbox" className="peer sr-only sm:hidden" />
          <label
            htmlFor="app-menu"
            className="ml-auto inline-flex min-h-11 cursor-pointer items-center gap-2 rounded-full border border-paper/40 px-4 text-lg peer-focus-visible:outline-2 peer-focus-visible:outline-brass sm:hidden"
          >
            <Icon name="menu" className="h-5 w-5" />
            Menu
          </label>
          <div className="hidden w-full flex-wrap items-center gap-x-6 gap-y-2 pb-2 peer-checked:flex sm:flex sm:flex-1 sm:pb-0">
          <nav aria-label="Main" className="flex flex-wrap gap-1 text-lg">
            {links.map((l) => (
              <NavLink
                key={l.to}
                to={l.to}
                end
                className={({ isActive }) =>
                  `rounded-full px-3 py-1 ${isActive ? "bg-brass text-rosewood" : "hover:bg-white/10"}`
                }
              >
                {l.label}
              </NavLink>
            ))}
            {user?.role === "admin" && showOutbox ? (
              <NavLink to="/admin/outbox" className="rounded-full px-3 py-1 hover:bg-white/10">
                Outbox
              </NavLink>
            ) : null}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            {user ? (
              <>
                <span className="hidden sm:inline" title={`Signed in as a ${user.role}`}>
                  {user.displayName}
                </span>
                <NavLink to="/settings/devices" className="rounded-full px-3 py-1 hover:bg-white/10">
                  Settings
                </NavLink>
                <Form method="post" action="/signout">
                  <button className="rounded-full border border-paper/40 px-3 py-1 hover:bg-white/10">Sign out</button>
                </Form>
              </>
            ) : (
              <>
                <Link to="/signin" className="rounded-full px-3 py-1 hover:bg-white/10">
                  Sign in
                </Link>
                <Link to="/signup" className="rounded-full bg-brass px-4 py-1 font-medium text-rosewood">
                  Start a studio
                </Link>
              </>
            )}
          </div>
          </div>
        </div>
      </header>
      <main className="mx-auto w-full max-w-6xl flex-1 px-4 py-3 sm:py-6">{children}</main>
      <footer className="no-print border-t border-ink/10 px-4 py-4 text-center text-sm text-ink-soft">
        Fretcall · read the note, find the fret · take a short break every 20 minutes to rest your hands
      </footer>
    </div>
  );
}
