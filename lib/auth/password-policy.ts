// Passwords: at least 10 characters (better-auth checks the length) and not one
// of the passwords attackers try first. The list is zxcvbn-ts's common-password
// dictionary (about 49,000 passwords ranked by how often they appear in
// published leaks), compared without regard to case.
import { dictionary } from "@zxcvbn-ts/language-common";

export const PASSWORD_MIN = 10;
export const PASSWORD_MAX = 128;

let common: Set<string> | undefined;

export function isCommonPassword(password: string): boolean {
  common ??= new Set(dictionary["passwords-common"].filter((p) => p.length >= PASSWORD_MIN).map((p) => p.toLowerCase()));
  return common.has(password.toLowerCase());
}

export const COMMON_PASSWORD_MESSAGE = "That password is on the lists of common passwords that attackers try first. Choose one that is yours alone.";
