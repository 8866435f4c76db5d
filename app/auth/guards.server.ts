import { data, redirect, type RouterContextProvider } from "react-router";
import { services } from "~/context";
import type { Role } from "~/db/schema";
import { mayTeach } from "./access.server";
import { userIdForToken } from "./tokens.server";
import { getUserById, type SessionUser } from "./users.server";

type Ctx = Readonly<RouterContextProvider>;

const wantsJson = (request: Request) => new URL(request.url).pathname.startsWith("/api/");

/**
 * The signed-in user, or undefined: from the session cookie, or — for the JSON API only — from a
 * personal API token (Authorization: Bearer …). A cookie naming a deleted user counts as signed out.
 */
export async function getOptionalUser(request: Request, context: Ctx): Promise<SessionUser | undefined> {
  const { sessions, db } = services(context);
  const bearer = /^Bearer (\S+)$/.exec(request.headers.get("Authorization") ?? "")?.[1];
  if (bearer && wantsJson(request)) {
    const tokenUser = await userIdForToken(db, bearer);
    return tokenUser ? getUserById(db, tokenUser) : undefined;
  }
  const session = await sessions.getSession(request.headers.get("Cookie"));
  const userId = session.get("userId");
  return userId ? getUserById(db, userId) : undefined;
}

/** Pages send a signed-out visitor to sign in (and back); the JSON API answers 401. */
export async function requireUser(request: Request, context: Ctx): Promise<SessionUser> {
  const user = await getOptionalUser(request, context);
  if (user) return user;
  if (wantsJson(request)) throw data({ error: "Sign in first." }, { status: 401 });
  const url = new URL(request.url);
  throw redirect(`/signin?${new URLSearchParams({ redirectTo: url.pathname + url.search })}`);
}

/** 403 for a signed-in user of another role; whoever `mayTeach` passes every teacher check. */
export async function requireUserWithRole(request: Request, context: Ctx, roles: readonly Role[]) {
  const user = await requireUser(request, context);
  const allowed = roles.includes(user.role) || (mayTeach(user.role) && roles.includes("teacher"));
  if (!allowed) {
    throw data(
      { error: `This page is for ${roles.join(" or ")} accounts.` },
      { status: 403, statusText: "Forbidden" },
    );
  }
  return user;
}
