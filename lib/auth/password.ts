import bcrypt from "bcryptjs";

// Cost 10 is bcrypt's common-practice default; raise it when the hardware allows.
const COST = 10;

export const hashPassword = (plain: string) => bcrypt.hash(plain, COST);
export const verifyPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);
