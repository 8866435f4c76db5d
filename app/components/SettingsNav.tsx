import { NavLink } from "react-router";
import type { Role } from "~/db/schema";

/** The settings pages' own menu; API tokens are for teachers and admins. */
export function SettingsNav({ role }: { role: Role }) {
  const links = [
    { to: "/settings/devices", label: "Signed-in devices" },
    { to: "/settings/password", label: "Password" },
    ...(role === "student" ? [] : [{ to: "/settings/tokens", label: "API tokens" }]),
  ];
  return (
    <nav aria-label="Settings" className="mb-4 flex flex-wrap gap-2">
      {links.map((l) => (
        <NavLink
          key={l.to}
          to={l.to}
          end
          className={({ isActive }) => `rounded-full border-2 px-4 py-1 ${isActive ? "border-brass bg-brass text-rosewood" : "border-ink/20 hover:bg-ink/5"}`}
        >
          {l.label}
        </NavLink>
      ))}
    </nav>
  );
}
