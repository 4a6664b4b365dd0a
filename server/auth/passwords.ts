import bcrypt from 'bcryptjs';

/** bcrypt work factor; 10 is the floor the product promises. */
export const BCRYPT_COST = 10;

/** Hashes a password with bcrypt. */
export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

/** Compares a password with a stored hash; a missing hash never matches. */
export function verifyPassword(password: string, hash: string | null): Promise<boolean> {
  // Compare against a fixed hash when none is stored so the timing does not reveal which e-mails exist.
  return bcrypt.compare(password, hash ?? DUMMY_HASH).then((ok) => ok && hash !== null);
}

const DUMMY_HASH = '$2b$10$CwTycUXWue0Thq9StjUM0uJ8.3pIuwqzA0fvtyMd5yDMsGlyEKx4W';
