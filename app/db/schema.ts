// The one place the database is described; drizzle-kit generates migrations from it.
import { sql } from "drizzle-orm";
import { index, integer, primaryKey, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";

const createdAt = () =>
  integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`);

export const ROLES = ["admin", "teacher", "student"] as const;
export type Role = (typeof ROLES)[number];

/** A school or studio. Everything a teacher or student sees belongs to one. */
export const organisations = sqliteTable("organisations", {
  id: text("id").primaryKey(),
  name: text("name").notNull(),
  createdAt: createdAt(),
});

export const users = sqliteTable(
  "users",
  {
    id: text("id").primaryKey(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    role: text("role", { enum: ROLES }).notNull(),
    displayName: text("display_name").notNull(),
    // Students may be nickname-only: no e-mail, no password.
    email: text("email"),
    passwordHash: text("password_hash"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email), index("users_org_idx").on(t.orgId)],
);

export const classes = sqliteTable(
  "classes",
  {
    id: text("id").primaryKey(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    // Code a student types to join the class roster (not a live-round room code).
    joinCode: text("join_code").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("classes_join_code_unique").on(t.joinCode), index("classes_org_idx").on(t.orgId)],
);

/** Who teaches and who studies in which class. */
export const memberships = sqliteTable(
  "memberships",
  {
    classId: text("class_id")
      .notNull()
      .references(() => classes.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: text("role", { enum: ["teacher", "student"] }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.classId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

/** One-time password-reset links; only a hash of the token is kept. */
export const passwordResets = sqliteTable("password_resets", {
  tokenHash: text("token_hash").primaryKey(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
  usedAt: integer("used_at", { mode: "timestamp_ms" }),
  createdAt: createdAt(),
});
