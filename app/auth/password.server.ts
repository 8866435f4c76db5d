import bcrypt from "bcryptjs";

// Cost 10 keeps a sign-in near 100 ms on a small server while staying expensive to brute-force.
const COST = 10;

export const hashPassword = (password: string) => bcrypt.hash(password, COST);
export const verifyPassword = (password: string, hash: string) => bcrypt.compare(password, hash);
