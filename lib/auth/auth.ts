// better-auth: e-mail and password with verification and reset mailed through
// the outbox (worker job), rate-limited sign-in kept in Redis, and a member role
// granted to every new account. Created lazily so that importing this module
// needs no environment (next build, tests).
import { betterAuth } from "better-auth";
import { APIError } from "better-auth/api";
import { drizzleAdapter } from "better-auth/adapters/drizzle";
import { getDb } from "@/db/client";
import { findSocietySettings } from "@/db/queries/settings";
import { insertRole } from "@/db/queries/roles";
import * as schema from "@/db/schema";
import { sendStagedMail, stageMail, type MailDraft } from "@/lib/email/outbox";
import { invitationMail, passwordResetMail, verificationMail } from "@/lib/email/templates";
import { describeInvitation, extendInvitationToken, INVITATION_VALID_DAYS, isAwaitingFirstPassword, isDisabled } from "@/lib/people/account-state";
import { getEnv } from "@/lib/env";
import { getProducerRedis } from "@/lib/queue/connection";
import { CLIENT_ADDRESS_HEADER } from "@/lib/http/client-address";
import { createRedisRateStore } from "@/lib/rate-limit/redis-store";
import { createAuthHooks } from "./auth-hooks";
import { displayNameProblem } from "./display-name";
import { PASSWORD_MAX, PASSWORD_MIN } from "./password-policy";

/** Sign-in attempts per client address and minute before answers become 429 (failures per e-mail: auth-hooks.ts). */
export const SIGN_IN_ATTEMPTS_PER_MINUTE = 10;

function createAuth() {
  const env = getEnv();
  const db = getDb();
  const appOrigin = new URL(env.APP_URL).origin;
  const altOrigin = appOrigin.includes("127.0.0.1") ? appOrigin.replace("127.0.0.1", "localhost") : appOrigin.replace("localhost", "127.0.0.1");
  const rateStore = createRedisRateStore(getProducerRedis(), "crownlight:auth-rate:");
  // These mails tell of no change of ours: each is staged and sent at once.
  const sendNow = async (draft: MailDraft) => sendStagedMail(db, [await stageMail(db, draft)]);

  return betterAuth({
    appName: "Crownlight",
    baseURL: env.BETTER_AUTH_URL,
    secret: env.BETTER_AUTH_SECRET,
    trustedOrigins: [appOrigin, altOrigin],
    database: drizzleAdapter(db, { provider: "pg", usePlural: true, schema }),
    emailAndPassword: {
      enabled: true,
      requireEmailVerification: true,
      minPasswordLength: PASSWORD_MIN,
      maxPasswordLength: PASSWORD_MAX,
      resetPasswordTokenExpiresIn: 3600,
      revokeSessionsOnPasswordReset: true,
      async sendResetPassword({ user, url, token }) {
        const society = (await findSocietySettings(db)).name;
        // Someone an admin invited has no password yet: their link is an invitation, valid for days.
        if (await isAwaitingFirstPassword(db, user.id)) {
          await extendInvitationToken(db, token);
          const invitation = await describeInvitation(db, user.id);
          await sendNow(invitationMail(society, user.email, user.name, { ...invitation, url, validDays: INVITATION_VALID_DAYS }));
          return;
        }
        await sendNow(passwordResetMail(society, user.email, url));
      },
    },
    emailVerification: {
      sendOnSignUp: true,
      autoSignInAfterVerification: true,
      expiresIn: 24 * 3600,
      async sendVerificationEmail({ user, url }) {
        const society = (await findSocietySettings(db)).name;
        await sendNow(verificationMail(society, user.email, url));
      },
    },
    session: { expiresIn: 30 * 24 * 3600, updateAge: 24 * 3600 },
    rateLimit: {
      enabled: true,
      window: 60,
      max: 200,
      customStorage: rateStore,
      customRules: {
        "/sign-in/email": { window: 60, max: SIGN_IN_ATTEMPTS_PER_MINUTE },
        "/sign-up/email": { window: 60, max: 10 },
        "/request-password-reset": { window: 60, max: 5 },
        "/send-verification-email": { window: 60, max: 5 },
      },
    },
    hooks: createAuthHooks(rateStore),
    databaseHooks: {
      session: {
        create: {
          // A disabled person gets no session, whatever the sign-in path.
          async before(session) {
            if (await isDisabled(db, session.userId)) {
              throw APIError.from("FORBIDDEN", { message: "This account is disabled.", code: "ACCOUNT_DISABLED" });
            }
          },
        },
      },
      user: {
        // The endpoints' hooks answer with the reason first; this holds for any other way in.
        update: {
          async before(user) {
            if ("name" in user && displayNameProblem(user.name)) return false;
          },
        },
        create: {
          async before(user) {
            if (displayNameProblem(user.name)) return false;
          },
          async after(user) {
            await insertRole(db, user.id, "member", null);
          },
        },
      },
    },
    advanced: {
      // Stamped by the web process from the socket (and trusted proxies only): lib/http/client-address.ts.
      ipAddress: { ipAddressHeaders: [CLIENT_ADDRESS_HEADER] },
    },
  });
}

type Auth = ReturnType<typeof createAuth>;
let instance: Auth | undefined;

export function getAuth(): Auth {
  instance ??= createAuth();
  return instance;
}
