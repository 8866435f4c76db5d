import { createCookieSessionStorage, redirect } from "react-router";
import type { Role } from "~/db/schema";

export interface SessionData {
  userId: string;
}
export interface SessionFlash {
  notice: string;
}

export const SESSION_COOKIE = "fretcall_session";

export function createSessionStorage(secret: string, production: boolean) {
  return createCookieSessionStorage<SessionData, SessionFlash>({
    cookie: {
      name: SESSION_COOKIE,
      httpOnly: true,
      sameSite: "lax",
      secure: production,
      path: "/",
      secrets: [secret],
      maxAge: 60 * 60 * 24 * 30,
    },
  });
}
export type SessionStorage = ReturnType<typeof createSessionStorage>;

/** Each role's landing page after sign-in. */
export function homeFor(role: Role): string {
  return role === "student" ? "/me" : role === "admin" ? "/admin" : "/teach";
}

export async function startSession(storage: SessionStorage, request: Request, userId: string, to: string) {
  const session = await storage.getSession(request.headers.get("Cookie"));
  session.set("userId", userId);
  return redirect(to, { headers: { "Set-Cookie": await storage.commitSession(session) } });
}
