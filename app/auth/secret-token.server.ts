import { createHash, randomBytes } from "node:crypto";

// Links and API tokens carry 32 random bytes or more; only a SHA-256 of them is stored, so a copy of
// the database alone opens nothing. A fast hash suffices: the tokens have no guessable structure.
export const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

export const newToken = (bytes = 32) => randomBytes(bytes).toString("base64url");
