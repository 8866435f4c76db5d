import { requireUser } from "~/auth/guards.server";
import type { Route } from "./+types/me";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser(request, context);
  return Response.json(
    { id: user.id, displayName: user.displayName, role: user.role, email: user.email },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
