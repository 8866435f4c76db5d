// E-mailed invitations: a link to set a password (and, for a student, to join the class).
// Single use, 7 days, and a resend replaces the old link. Only a hash of each token is stored.
import { and, eq, gt, isNull } from "drizzle-orm";
import { hashToken, newToken } from "~/auth/secret-token.server";
import { hashPassword } from "~/auth/password.server";
import type { Db } from "~/db/client.server";
import { classes, invitations, memberships, users } from "~/db/schema";
import type { Mailer } from "~/mail/mailer.server";

export const INVITE_TTL_MS = 7 * 24 * 60 * 60 * 1000;

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** A new link for a user in a class; any earlier live link of theirs for that class stops working. */
export async function createInvitation(
  db: Db | Tx,
  input: { userId: string; classId: string; invitedBy: string },
  now = Date.now(),
) {
  const token = newToken();
  await db
    .update(invitations)
    .set({ revokedAt: new Date(now) })
    .where(
      and(
        eq(invitations.userId, input.userId),
        eq(invitations.classId, input.classId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    );
  await db.insert(invitations).values({ tokenHash: hashToken(token), ...input, expiresAt: new Date(now + INVITE_TTL_MS) });
  return token;
}

/** Stops a user's open links for a class, for example when they leave it. */
export async function revokeInvitations(db: Db | Tx, userId: string, classId: string, now = Date.now()) {
  await db
    .update(invitations)
    .set({ revokedAt: new Date(now) })
    .where(and(eq(invitations.userId, userId), eq(invitations.classId, classId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
}

export type InviteState =
  | { state: "live"; userId: string; classId: string; displayName: string; email: string; role: "teacher" | "student"; className: string }
  | { state: "unknown" | "used" | "revoked" | "expired" };

export const INVITE_PROBLEMS: Record<Exclude<InviteState["state"], "live">, string> = {
  unknown: "This invitation link isn't valid. Check that you copied the whole link.",
  used: "This invitation was already used. Sign in with the password you chose, or ask for a password reset.",
  revoked: "This invitation was replaced by a newer one. Use the link in the most recent e-mail.",
  expired: "This invitation has expired (links last 7 days). Ask your teacher to send a new one.",
};

export async function invitationState(db: Db, token: string, now = Date.now()): Promise<InviteState> {
  const [row] = await db
    .select({
      userId: invitations.userId,
      classId: invitations.classId,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      displayName: users.displayName,
      email: users.email,
      role: users.role,
      className: classes.name,
    })
    .from(invitations)
    .innerJoin(users, eq(users.id, invitations.userId))
    .innerJoin(classes, eq(classes.id, invitations.classId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!row || !row.email) return { state: "unknown" };
  if (row.acceptedAt) return { state: "used" };
  if (row.revokedAt) return { state: "revoked" };
  if (row.expiresAt.getTime() <= now) return { state: "expired" };
  return {
    state: "live",
    userId: row.userId,
    classId: row.classId,
    displayName: row.displayName,
    email: row.email,
    role: row.role === "student" ? "student" : "teacher",
    className: row.className,
  };
}

/** Sets the password, spends the link and (re)joins the class, all or nothing. */
export async function acceptInvitation(db: Db, token: string, password: string, now = Date.now()): Promise<InviteState> {
  const invite = await invitationState(db, token, now);
  if (invite.state !== "live") return invite;
  const passwordHash = await hashPassword(password);
  return db.transaction(async (tx) => {
    const spent = await tx
      .update(invitations)
      .set({ acceptedAt: new Date(now) })
      .where(
        and(
          eq(invitations.tokenHash, hashToken(token)),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, new Date(now)),
        ),
      )
      .returning({ userId: invitations.userId });
    // A concurrent request spent it first.
    if (spent.length === 0) return { state: "used" as const };
    await tx.update(users).set({ passwordHash }).where(eq(users.id, invite.userId));
    await tx
      .insert(memberships)
      .values({ classId: invite.classId, userId: invite.userId, role: invite.role })
      .onConflictDoNothing();
    return invite;
  });
}

async function mailInvitation(
  mailer: Mailer,
  publicUrl: string,
  to: { email: string; displayName: string; role: "teacher" | "student"; className: string; orgId: string; token: string },
) {
  const link = `${publicUrl}/invite/${to.token}`;
  const what =
    to.role === "student"
      ? `Your guitar teacher has added you to the class "${to.className}" on Fretcall, where you practise reading music on the guitar.`
      : `You've been added as a teacher of "${to.className}" on Fretcall.`;
  await mailer.send({
    orgId: to.orgId,
    to: to.email,
    subject: to.role === "student" ? `Join ${to.className} on Fretcall` : "You're invited to teach on Fretcall",
    text: `Hello ${to.displayName},\n\n${what} To choose your password and sign in, open this link within 7 days:\n\n${link}\n\nThe link works once. If you weren't expecting this, ignore this e-mail.\n`,
  });
}

/** Mails each invitation; a failed send is counted, not thrown, since the links can be resent later. */
export async function mailInvitations(
  mailer: Mailer,
  publicUrl: string,
  list: readonly { email: string; displayName: string; token: string }[],
  role: "teacher" | "student",
  className: string,
  orgId: string,
) {
  let failed = 0;
  for (const invite of list) {
    try {
      await mailInvitation(mailer, publicUrl, { ...invite, role, className, orgId });
    } catch (error) {
      failed += 1;
      console.error("invitation e-mail failed", error);
    }
  }
  return failed;
}

/** The note that goes to an address added to a class while it has an account at another school. */
export function addressInUseMail(publicUrl: string, to: { email: string; displayName: string }, role: "teacher" | "student", className: string) {
  return {
    // System mail: in the adding school's outbox it would tell them the address has an account.
    orgId: null,
    to: to.email,
    subject: "Someone tried to add you on Fretcall",
    text: `Hello,\n\nA ${role === "student" ? "guitar teacher" : "school"} on Fretcall tried to add this address, under the name ${to.displayName}, as a ${role} of the class "${className}". This address already has a Fretcall account, and one address can hold one account, so nothing was sent to join.\n\nIf you want to join that class, ask them to use another e-mail address. Your own account is unchanged; you can sign in at ${publicUrl}/signin. If you don't know them, ignore this e-mail.\n`,
  };
}
