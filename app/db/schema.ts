// The one place the database is described; drizzle-kit generates migrations from it.
import { sql } from "drizzle-orm";
import { blob, index, integer, primaryKey, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
// Types only: drizzle-kit reads this file without the app's path aliases.
import type { RoomRecord } from "~/game/room";
import type { RoomConfig } from "~/game/roomConfig";
import type { NoteNaming } from "~/music/naming";
import type { SpotMap } from "~/music/positions";
import type { RhythmScore } from "~/practice/rhythm";
import type { ReadingSetSpec } from "~/reading/spec";
import type { QuickSetup } from "~/rooms/setup";
import type { StoredScore, TuneNote } from "~/tunes/builtin";

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
  // How the school names notes in words (app/music/naming.ts); each student's device may choose its own.
  noteNaming: text("note_naming", { enum: ["letters", "solfege", "german"] as const satisfies readonly NoteNaming[] })
    .notNull()
    .default("letters"),
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

/**
 * Signed-in sessions. The cookie carries a random id; only its SHA-256 is kept, so a copy of the
 * database opens no session. `device` is a coarse browser-and-system label, never an address.
 */
export const userSessions = sqliteTable(
  "sessions",
  {
    // A handle for the devices page; the secret id never leaves the cookie.
    id: text("id").primaryKey(),
    tokenHash: text("token_hash").notNull(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    device: text("device").notNull(),
    // Set when a sign-in card opened the session: a device session, ended with its card.
    cardId: text("card_id").references(() => signInCards.id, { onDelete: "cascade" }),
    // React Router's flash values, kept until the next read.
    flash: text("flash", { mode: "json" }).$type<Record<string, unknown>>(),
    createdAt: createdAt(),
    lastSeenAt: integer("last_seen_at", { mode: "timestamp_ms" }).notNull(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    idleExpiresAt: integer("idle_expires_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [uniqueIndex("sessions_token_hash_unique").on(t.tokenHash), index("sessions_user_idx").on(t.userId)],
);

/**
 * A student's sign-in card (docs/decisions/0008-sign-in-cards.md): one live card per student. The QR
 * code's token is kept as a SHA-256, the short personal code as an HMAC keyed from SESSION_SECRET (a
 * short code's plain hash could be found by trying them all). Re-issuing deletes the row, which ends
 * the devices it signed in.
 */
export const signInCards = sqliteTable(
  "sign_in_cards",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull(),
    codeHash: text("code_hash").notNull(),
    issuedBy: text("issued_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("sign_in_cards_user_unique").on(t.userId),
    uniqueIndex("sign_in_cards_token_unique").on(t.tokenHash),
    uniqueIndex("sign_in_cards_code_unique").on(t.codeHash),
  ],
);

// ---- live rounds ------------------------------------------------------------------------------

/**
 * A live round. `config` is the game's RoomConfig (prompt order included), fixed at creation; `setup` is
 * what the teacher chose, kept so "Host this again" can draw afresh (null for rounds from before it was kept).
 */
export const rooms = sqliteTable(
  "rooms",
  {
    id: text("id").primaryKey(),
    code: text("code").notNull(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    hostUserId: text("host_user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    classId: text("class_id").references(() => classes.id, { onDelete: "set null" }),
    // What the round was hosted from, for the class review (the config itself is self-contained).
    readingSetId: text("reading_set_id").references(() => readingSets.id, { onDelete: "set null" }),
    title: text("title").notNull(),
    mode: text("mode").notNull(),
    // The position the round reads in: pads zoom their fretboard to it.
    position: integer("position").notNull(),
    config: text("config", { mode: "json" }).$type<RoomConfig>().notNull(),
    setup: text("setup", { mode: "json" }).$type<QuickSetup>(),
    // The ready-made or saved set's name at the time, for the title of a round hosted again.
    sourceName: text("source_name"),
    endedAt: integer("ended_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [
    // A code is reused only after its room has ended.
    uniqueIndex("rooms_open_code_unique").on(t.code).where(sql`ended_at IS NULL`),
    index("rooms_host_idx").on(t.hostUserId),
    index("rooms_class_idx").on(t.classId),
  ],
);

/**
 * Cluster mode only (docs/decisions/0009-several-nodes.md): which node may write for a live room.
 * A node that takes the room raises `fence` by one; every write batch for the room first checks
 * that the fence is still the one its node took, so a node that lost the room writes nothing more.
 */
export const roomLeases = sqliteTable("room_leases", {
  roomId: text("room_id")
    .primaryKey()
    .references(() => rooms.id, { onDelete: "cascade" }),
  fence: integer("fence").notNull(),
  nodeId: text("node_id").notNull(),
  takenAt: integer("taken_at", { mode: "timestamp_ms" }).notNull(),
});

/**
 * Never holds a row: inserting (room, fence) runs the trigger `room_fence_check` (migration
 * room_leases), which aborts the statement, and so the write's whole transaction, unless that room's
 * fence is still `fence`. Being a statement, the check runs inside the write's own transaction.
 */
export const roomFenceChecks = sqliteTable("room_fence_checks", {
  roomId: text("room_id").notNull(),
  fence: integer("fence").notNull(),
});

/** The room's event log: replaying it through the game reducer rebuilds the room after a restart. */
export const roomEvents = sqliteTable(
  "room_events",
  {
    roomId: text("room_id")
      .notNull()
      .references(() => rooms.id, { onDelete: "cascade" }),
    seq: integer("seq").notNull(),
    at: integer("at").notNull(),
    event: text("event", { mode: "json" }).$type<RoomRecord>().notNull(),
  },
  (t) => [primaryKey({ columns: [t.roomId, t.seq] })],
);

/** A seat in a room: a nickname, and the account when a signed-in student joined. */
export const roomPlayers = sqliteTable(
  "room_players",
  {
    id: text("id").primaryKey(),
    roomId: text("room_id")
      .notNull()
      .references(() => rooms.id, { onDelete: "cascade" }),
    userId: text("user_id").references(() => users.id, { onDelete: "set null" }),
    nickname: text("nickname").notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("room_players_room_idx").on(t.roomId), index("room_players_user_idx").on(t.userId)],
);

/** Every accepted answer, one row each, for results and the class review. */
export const answers = sqliteTable(
  "answers",
  {
    roomId: text("room_id")
      .notNull()
      .references(() => rooms.id, { onDelete: "cascade" }),
    playerId: text("player_id")
      .notNull()
      .references(() => roomPlayers.id, { onDelete: "cascade" }),
    promptIndex: integer("prompt_index").notNull(),
    written: text("written").notNull(),
    writtenMidi: integer("written_midi").notNull(),
    string: integer("string").notNull(),
    fret: integer("fret").notNull(),
    kind: text("kind").notNull(),
    pitchRight: integer("pitch_right", { mode: "boolean" }).notNull(),
    // What the round gave (full credit or not depends on its home-spot-only setting). Null only until
    // the start-up data step has replayed the room's log (app/rooms/verdicts.server.ts).
    verdict: text("verdict", { enum: ["right", "partial", "wrong"] }),
    points: integer("points").notNull(),
    reactionMs: integer("reaction_ms").notNull(),
    streak: integer("streak").notNull(),
    at: integer("at").notNull(),
  },
  (t) => [
    // Full neck lets a player find several spots of one prompt, so the spot is part of the key.
    primaryKey({ columns: [t.roomId, t.playerId, t.promptIndex, t.string, t.fret] }),
    index("answers_room_prompt_idx").on(t.roomId, t.promptIndex),
  ],
);

// ---- teacher workspace -----------------------------------------------------------------------

/** An e-mailed link to set a password and join a class; only a hash of the token is kept. */
export const invitations = sqliteTable(
  "invitations",
  {
    tokenHash: text("token_hash").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    classId: text("class_id")
      .notNull()
      .references(() => classes.id, { onDelete: "cascade" }),
    invitedBy: text("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    acceptedAt: integer("accepted_at", { mode: "timestamp_ms" }),
    // A resend replaces the link: the old one stops working.
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("invitations_user_idx").on(t.userId)],
);

/** A saved description of what to read; `spec` holds the reading spec and round settings. */
export const readingSets = sqliteTable(
  "reading_sets",
  {
    id: text("id").primaryKey(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    classId: text("class_id").references(() => classes.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    // Parsed again on every read (app/reading/readingSet.ts): a set stored under older rules may need an edit.
    spec: text("spec", { mode: "json" }).$type<ReadingSetSpec>().notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }),
  },
  (t) => [index("reading_sets_org_idx").on(t.orgId), index("reading_sets_class_idx").on(t.classId)],
);

/** A class's own home-spot map for a position and tuning, replacing the default one. */
export const spotMaps = sqliteTable(
  "spot_maps",
  {
    classId: text("class_id")
      .notNull()
      .references(() => classes.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    tuning: text("tuning").notNull(),
    map: text("map", { mode: "json" }).$type<SpotMap>().notNull(),
    updatedBy: text("updated_by").references(() => users.id, { onDelete: "set null" }),
    updatedAt: integer("updated_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.classId, t.position, t.tuning] })],
);

/** A melody for Tune walks and rhythm passes: uploaded MusicXML, reduced to one line of notes. */
export const tunes = sqliteTable(
  "tunes",
  {
    id: text("id").primaryKey(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    title: text("title").notNull(),
    composer: text("composer").notNull().default(""),
    keyFifths: integer("key_fifths").notNull(),
    beatsPerBar: integer("beats_per_bar").notNull(),
    // [{ pitch, beats, bar, onset, tied }]: the shape app/tunes/builtin.ts uses.
    notes: text("notes", { mode: "json" }).$type<TuneNote[]>().notNull(),
    // Bars with their meter and key, the part read, the score's parts and what was left out;
    // null for tunes uploaded before these were kept.
    score: text("score", { mode: "json" }).$type<StoredScore>(),
    // The uploaded file, zlib-deflated, so the score can be read again (another part, a better reader).
    source: blob("source", { mode: "buffer" }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [index("tunes_org_idx").on(t.orgId)],
);

/** Personal API tokens for the JSON API; only a hash is kept, shown once when created. */
export const apiTokens = sqliteTable(
  "api_tokens",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    tokenHash: text("token_hash").notNull(),
    lastUsedAt: integer("last_used_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("api_tokens_hash_unique").on(t.tokenHash), index("api_tokens_user_idx").on(t.userId)],
);

// ---- between lessons ---------------------------------------------------------------------------

/** A reading set or a tune set for a class (or chosen students) with a goal and a due date. */
export const assignments = sqliteTable(
  "assignments",
  {
    id: text("id").primaryKey(),
    orgId: text("org_id")
      .notNull()
      .references(() => organisations.id, { onDelete: "cascade" }),
    classId: text("class_id")
      .notNull()
      .references(() => classes.id, { onDelete: "cascade" }),
    title: text("title").notNull(),
    // One of: a saved reading set, a ready-made one (by preset id), or a tune (uploaded or built in).
    readingSetId: text("reading_set_id").references(() => readingSets.id, { onDelete: "set null" }),
    presetId: text("preset_id"),
    tuneId: text("tune_id"),
    goalNotes: integer("goal_notes").notNull(),
    goalAccuracy: integer("goal_accuracy_pct").notNull(),
    goalMedianMs: integer("goal_median_ms"),
    // Only answers played on a guitar (heard by the phone) count toward the goal.
    playedOnly: integer("played_only", { mode: "boolean" }).notNull().default(false),
    dueAt: integer("due_at", { mode: "timestamp_ms" }).notNull(),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    remindedAt: integer("reminded_at", { mode: "timestamp_ms" }),
    createdAt: createdAt(),
  },
  (t) => [index("assignments_class_idx").on(t.classId)],
);

/** Chosen students of an assignment; none means the whole class. */
export const assignmentTargets = sqliteTable(
  "assignment_targets",
  {
    assignmentId: text("assignment_id")
      .notNull()
      .references(() => assignments.id, { onDelete: "cascade" }),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
  },
  (t) => [primaryKey({ columns: [t.assignmentId, t.userId] })],
);

/** Every answer a student gives in solo practice. `clientId` makes a resend after a dropped connection harmless. */
export const practiceAnswers = sqliteTable(
  "practice_answers",
  {
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    clientId: text("client_id").notNull(),
    assignmentId: text("assignment_id").references(() => assignments.id, { onDelete: "set null" }),
    source: text("source").notNull(),
    position: integer("position").notNull(),
    tuning: text("tuning").notNull(),
    written: text("written").notNull(),
    writtenMidi: integer("written_midi").notNull(),
    // How the answer was given: "tap" (the spot tapped: string and fret) or "played" (the sounding note a
    // microphone heard: heardMidi and heardCents; a microphone cannot tell the string, so no spot).
    input: text("input", { enum: ["tap", "played"] }).notNull().default("tap"),
    string: integer("string"),
    fret: integer("fret"),
    heardMidi: integer("heard_midi"),
    heardCents: integer("heard_cents"),
    kind: text("kind").notNull(),
    pitchRight: integer("pitch_right", { mode: "boolean" }).notNull(),
    reactionMs: integer("reaction_ms").notNull(),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.clientId] }), index("practice_user_at_idx").on(t.userId, t.at)],
);

/** A rhythm pass over a tune: per-note timing results. */
export const rhythmAttempts = sqliteTable(
  "rhythm_attempts",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tuneId: text("tune_id").notNull(),
    tempo: integer("tempo").notNull(),
    score: integer("score_pct").notNull(),
    results: text("results", { mode: "json" }).$type<RhythmScore & { position: number; latencyMs?: number }>().notNull(),
    // How the notes were given: taps on the screen, or played on the guitar and heard by the microphone.
    input: text("input", { enum: ["tap", "played"] }).notNull().default("tap"),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("rhythm_user_idx").on(t.userId)],
);

/** What was mailed, so a notice, reminder or weekly digest goes out once. */
export const mailLog = sqliteTable(
  "mail_log",
  {
    kind: text("kind").notNull(),
    subjectId: text("subject_id").notNull(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    sentAt: integer("sent_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.kind, t.subjectId, t.userId] })],
);
