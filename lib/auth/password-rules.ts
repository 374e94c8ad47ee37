// Rules for a password that is the only factor, after NIST SP 800-63B Rev. 4 (section 3.1.1.2): at
// least 15 characters (code points), no composition rules, and refused when it repeats or runs one
// character pattern or names the service. Safe in the browser (the forms check the same rules); the
// list of common and breached passwords is checked on the server only (password-list.ts), so that
// 400 KB of passwords never reach a page.
export const MIN_PASSWORD_CHARS = 15;
export const MAX_PASSWORD_CHARS = 200;

const SERVICE_WORDS = ["halftrip"];

/** Each character the previous one plus a fixed step of -1, 0 or +1: "aaaa…", "abcd…", "4321…". */
function isRun(chars: string[]): boolean {
  const steps = new Set<number>();
  for (let i = 1; i < chars.length; i++) steps.add(chars[i].codePointAt(0)! - chars[i - 1].codePointAt(0)!);
  return steps.size === 1 && Math.abs([...steps][0]) <= 1;
}

/** One shorter unit said over and over: "abcabcabc…", "passwordpassword". */
function isRepeat(s: string): boolean {
  return /^(.+?)\1+$/su.test(s);
}

/** Why this password is refused by its length or shape, or null when acceptable. */
export function passwordShapeProblem(password: string): string | null {
  const chars = [...password];
  if (chars.length < MIN_PASSWORD_CHARS) return `Use at least ${MIN_PASSWORD_CHARS} characters; a few unrelated words make a long password easy to remember.`;
  if (chars.length > MAX_PASSWORD_CHARS) return `Use at most ${MAX_PASSWORD_CHARS} characters.`;
  const lower = password.toLowerCase();
  if (isRun(chars) || isRepeat(lower)) return "This password repeats one pattern; choose one that is harder to guess.";
  if (SERVICE_WORDS.some((w) => lower.includes(w))) return "Leave the name of the service out of your password.";
  return null;
}
