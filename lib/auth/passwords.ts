import bcrypt from "bcryptjs";
import { createHmac } from "node:crypto";

const ROUNDS = 10;

// bcrypt reads only the first 72 bytes of its input, so a long password would be cut short silently.
// New hashes bcrypt a pre-hash instead: HMAC-SHA-256 of the NFKC-normalised password under a fixed
// application key (so the stored hash cannot be matched against plain SHA-256 lists), base64, 44 bytes.
// The "$ht1$" mark tells these apart from the plain bcrypt hashes stored before, which still verify.
const PREHASHED = "$ht1$";
const PREHASH_KEY = "halftrip password pre-hash v1";

function prehash(password: string): string {
  return createHmac("sha256", PREHASH_KEY).update(password.normalize("NFKC"), "utf8").digest("base64");
}

export async function hashPassword(password: string): Promise<string> {
  return PREHASHED + (await bcrypt.hash(prehash(password), ROUNDS));
}

// Compared against when the user has none, so timing does not tell whether the e-mail exists.
const NO_USER_HASH = `${PREHASHED}$2b$10$CwTycUXWue0Thq9StjUM0uJ8.pn9gG0hNvX6VpjVLk4Zd2Z8pKMyK`;

export function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  const stored = hash ?? NO_USER_HASH;
  if (stored.startsWith(PREHASHED)) return bcrypt.compare(prehash(password), stored.slice(PREHASHED.length));
  return bcrypt.compare(password, stored);
}
