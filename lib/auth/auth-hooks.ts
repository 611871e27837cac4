// Checks better-auth runs before and after its own endpoints:
// - sign-in: failures are counted per e-mail address (besides better-auth's
//   count per client address), so rotating client addresses does not buy more
//   guesses at one account; successful sign-ins are not counted, so a person
//   who signs in often is never shut out by it;
// - sign-up and name changes: the display name (lib/auth/display-name.ts);
// - every new password: not a common one (lib/auth/password-policy.ts).
import { APIError, createAuthMiddleware } from "better-auth/api";
import { displayNameProblem } from "./display-name";
import { COMMON_PASSWORD_MESSAGE, isCommonPassword } from "./password-policy";

/** Failed sign-ins for one e-mail address in SIGN_IN_FAILURE_WINDOW_S before the address is refused. */
export const SIGN_IN_FAILURES_PER_EMAIL = 10;
export const SIGN_IN_FAILURE_WINDOW_S = 15 * 60;

export interface FailureStore {
  consume(key: string, rule: { window: number; max: number }): Promise<unknown>;
  peek(key: string): Promise<{ count: number; retryAfter: number | null }>;
}

const failureKey = (email: string) => `sign-in-failures:${email.trim().toLowerCase()}`;

const NEW_PASSWORD_FIELD: Record<string, string> = {
  "/sign-up/email": "password",
  "/reset-password": "newPassword",
  "/change-password": "newPassword",
  "/set-password": "newPassword",
};

function minutes(seconds: number): string {
  const m = Math.max(1, Math.ceil(seconds / 60));
  return `${m} minute${m === 1 ? "" : "s"}`;
}

export function createAuthHooks(store: FailureStore) {
  const before = createAuthMiddleware(async (ctx) => {
    const body = (ctx.body ?? {}) as Record<string, unknown>;
    if (ctx.path === "/sign-in/email" && typeof body.email === "string") {
      const { count, retryAfter } = await store.peek(failureKey(body.email));
      if (count >= SIGN_IN_FAILURES_PER_EMAIL) {
        throw new APIError("TOO_MANY_REQUESTS", {
          code: "TOO_MANY_FAILED_SIGN_INS",
          message: `Too many failed sign-ins for this address. Try again in ${minutes(retryAfter ?? SIGN_IN_FAILURE_WINDOW_S)}, or set a new password.`,
        });
      }
    }
    if (ctx.path === "/sign-up/email" || (ctx.path === "/update-user" && "name" in body)) {
      const problem = displayNameProblem(body.name);
      if (problem) throw new APIError("BAD_REQUEST", { code: "INVALID_NAME", message: problem });
    }
    const passwordField = NEW_PASSWORD_FIELD[ctx.path];
    // The length is better-auth's own check, with its own codes; the list is ours.
    const password = passwordField ? body[passwordField] : undefined;
    if (typeof password === "string" && isCommonPassword(password)) {
      throw new APIError("BAD_REQUEST", { code: "PASSWORD_TOO_COMMON", message: COMMON_PASSWORD_MESSAGE });
    }
  });

  const after = createAuthMiddleware(async (ctx) => {
    if (ctx.path !== "/sign-in/email") return;
    const body = (ctx.body ?? {}) as Record<string, unknown>;
    const returned = ctx.context.returned;
    if (typeof body.email === "string" && returned instanceof APIError && returned.statusCode === 401) {
      await store.consume(failureKey(body.email), { window: SIGN_IN_FAILURE_WINDOW_S, max: SIGN_IN_FAILURES_PER_EMAIL });
    }
  });

  return { before, after };
}
