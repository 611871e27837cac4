// Our wording for better-auth's answers. Unknown codes fall back to a generic
// sentence rather than showing internal text.
export function describeAuthError(error: { status?: number; code?: string; message?: string } | null | undefined): string {
  if (!error) return "";
  // Our own checks (lib/auth/auth-hooks.ts) write their message for people.
  if (error.code === "TOO_MANY_FAILED_SIGN_INS" || error.code === "INVALID_NAME" || error.code === "PASSWORD_TOO_COMMON") return error.message ?? "";
  if (error.status === 429) return "Too many attempts from here. Wait a minute, then try again.";
  switch (error.code) {
    case "INVALID_EMAIL_OR_PASSWORD":
      return "That e-mail and password do not match an account.";
    case "EMAIL_NOT_VERIFIED":
      return "Confirm your address first: we sent you a link when you signed up.";
    case "USER_ALREADY_EXISTS":
    case "USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL":
      return "An account with that e-mail already exists. Sign in, or reset the password.";
    case "PASSWORD_TOO_SHORT":
      return "The password is too short: use at least 10 characters.";
    case "PASSWORD_TOO_LONG":
      return "The password is too long: use at most 128 characters.";
    case "INVALID_EMAIL":
      return "That does not look like an e-mail address.";
    case "ACCOUNT_DISABLED":
      return "This account is disabled. Ask the society's administrators if you think this is a mistake.";
    case "INVALID_TOKEN":
      return "This link is no longer valid. Ask for a new one.";
    default:
      return "That did not work. Please try again in a moment.";
  }
}
