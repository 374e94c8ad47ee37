import bcrypt from "bcryptjs";

const ROUNDS = 10;

export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, ROUNDS);
}

export function verifyPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  // Compare against a fixed hash when the user has none, so timing does not tell whether the e-mail exists.
  return bcrypt.compare(password, hash ?? "$2b$10$CwTycUXWue0Thq9StjUM0uJ8.pn9gG0hNvX6VpjVLk4Zd2Z8pKMyK");
}
