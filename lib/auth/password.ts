import bcrypt from "bcryptjs";

const COST = 11;

export function hashPassword(plain: string): Promise<string> {
  return bcrypt.hash(plain, COST);
}

export function verifyPassword(plain: string, hash: string): Promise<boolean> {
  return bcrypt.compare(plain, hash);
}

// Compared against when the account does not exist, so timing does not reveal which e-mails are registered.
export const DUMMY_HASH = "$2b$11$lFOaWoqQiSYRR9qst7ttQeF3ZG3qm5xO.9kg585/BURIrQ9G3I17C";
