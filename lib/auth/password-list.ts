import { dictionary } from "@zxcvbn-ts/language-common";
import { passwordShapeProblem } from "./password-rules";

// The list of commonly used or breached passwords NIST SP 800-63B Rev. 4 asks to refuse: the
// "passwords-common" dictionary of @zxcvbn-ts/language-common (MIT; about 49 000 passwords drawn from
// public breach corpora), shipped with the app; nothing is looked up at run time. Server only.
const COMMON = new Set(dictionary["passwords-common"] as string[]);

export function isCommonPassword(password: string): boolean {
  return COMMON.has(password.toLowerCase());
}

export const COMMON_PASSWORD_MESSAGE = "This password is on a list of common or breached passwords; choose another.";

/** Every rule: length and shape (as the forms check them), then the list. */
export function passwordProblem(password: string): string | null {
  return passwordShapeProblem(password) ?? (isCommonPassword(password) ? COMMON_PASSWORD_MESSAGE : null);
}
