// Configuration, validated once at start by the web app (instrumentation.ts)
// and the worker (worker/index.ts). A missing or malformed value stops the
// process with the variable's name. Defaults for local development live in
// .env.example, which the scripts export; nothing here invents a value.
import { existsSync } from "node:fs";
import { z } from "zod";

const DEFAULT_SECRET = "development-only-secret-change-me-0123456789";

const bool = z
  .enum(["true", "false", "1", "0"], { error: "expected true or false" })
  .transform((v) => v === "true" || v === "1");

const url = (protocols: string[]) =>
  z.string({ error: "is missing" }).refine(
    (v) => {
      try {
        return protocols.includes(new URL(v).protocol);
      } catch {
        return false;
      }
    },
    { error: `expected a URL (${protocols.join(" or ")})` },
  );

/** A whole number of milliseconds, at least 1 s; `fallback` when unset or empty. */
const milliseconds = (fallback: number) =>
  z
    .string()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v === "") return fallback;
      const ms = Number(v);
      if (!Number.isInteger(ms) || ms < 1000) {
        ctx.addIssue({ code: "custom", message: "expected a whole number of milliseconds, at least 1000" });
        return z.NEVER;
      }
      return ms;
    });

export const envSchema = z
  .object({
    NODE_ENV: z.enum(["development", "test", "production"]).default("development"),
    APP_URL: url(["http:", "https:"]),
    DATABASE_URL: url(["postgres:", "postgresql:"]),
    REDIS_URL: url(["redis:", "rediss:"]),
    S3_ENDPOINT: z.union([url(["http:", "https:"]), z.literal("")]).optional(),
    S3_REGION: z.string({ error: "is missing" }).min(1, { error: "must not be empty" }),
    S3_ACCESS_KEY_ID: z.string({ error: "is missing" }).min(1, { error: "must not be empty" }),
    S3_SECRET_ACCESS_KEY: z.string({ error: "is missing" }).min(1, { error: "must not be empty" }),
    S3_FORCE_PATH_STYLE: bool.default(false),
    S3_BUCKET_ORIGINALS: z.string({ error: "is missing" }).min(3, { error: "must be a bucket name" }),
    S3_BUCKET_DERIVED: z.string({ error: "is missing" }).min(3, { error: "must be a bucket name" }),
    S3_BUCKET_EXPORTS: z.string({ error: "is missing" }).min(3, { error: "must be a bucket name" }),
    /** A CMYK ICC profile for print bundles; libvips' built-in one when empty. */
    EDITION_CMYK_ICC_PROFILE: z
      .string()
      .refine((v) => v === "" || existsSync(v), { error: "expected the path of a readable ICC profile file" })
      .optional(),
    /** Prefix of every BullMQ key, so that test lanes and benches keep their own queues beside the app's. */
    QUEUE_PREFIX: z
      .string()
      .regex(/^[A-Za-z0-9_-]{1,60}$/, { error: "expected letters, digits, - or _ (at most 60)" })
      .default("crownlight"),
    /**
     * The reduce queue's job lock and stalled-check interval, ms (the worker's). A
     * reduction's numeric stages hold the event loop for seconds at a time; a long lock
     * keeps BullMQ from handing the job to another worker meanwhile. Tests of a killed
     * worker's recovery shorten both.
     */
    WORKER_REDUCE_LOCK_MS: milliseconds(10 * 60_000),
    WORKER_REDUCE_STALLED_INTERVAL_MS: milliseconds(5 * 60_000),
    SMTP_URL: url(["smtp:", "smtps:"]),
    SMTP_IGNORE_TLS: bool.default(false),
    MAIL_FROM: z.string({ error: "is missing" }).min(3, { error: "must be a sender address" }),
    BETTER_AUTH_SECRET: z.string({ error: "is missing" }).min(32, { error: "must be at least 32 characters" }),
    BETTER_AUTH_URL: url(["http:", "https:"]),
    /**
     * How many proxies in front of the app append to X-Forwarded-For. 0 (the
     * default): the header is ignored and the client is the socket's peer, so a
     * client cannot choose the address that rate limits count. N: the address N
     * entries from the right of the header (what the outermost of our proxies saw).
     */
    TRUSTED_PROXY_HOPS: z
      .string()
      .regex(/^\d$/, { error: "expected a whole number of proxies from 0 to 9" })
      .default("0")
      .transform(Number),
  })
  .superRefine((env, ctx) => {
    // The committed development secret is refused wherever the app is served
    // beyond this machine; a local production build on loopback may keep it.
    const host = new URL(env.APP_URL).hostname;
    const isLoopback = host === "127.0.0.1" || host === "localhost" || host === "[::1]";
    if (env.NODE_ENV === "production" && !isLoopback && env.BETTER_AUTH_SECRET === DEFAULT_SECRET) {
      ctx.addIssue({
        code: "custom",
        path: ["BETTER_AUTH_SECRET"],
        message: "is the development default; a public deployment needs its own secret",
      });
    }
  });

export type Env = z.infer<typeof envSchema>;

export class EnvError extends Error {
  constructor(readonly problems: { name: string; message: string }[]) {
    super(`Configuration is not valid:\n${problems.map((p) => `  ${p.name} ${p.message}`).join("\n")}`);
    this.name = "EnvError";
  }
}

/** Parses a set of variables; throws EnvError naming every bad variable. */
export function parseEnv(source: Record<string, string | undefined>): Env {
  const result = envSchema.safeParse(source);
  if (result.success) return result.data;
  const problems = result.error.issues.map((issue) => ({
    name: String(issue.path[0] ?? "(environment)"),
    message: issue.message,
  }));
  throw new EnvError(problems);
}

let cached: Env | undefined;

/** The process's configuration, parsed on first use. */
export function getEnv(): Env {
  cached ??= parseEnv(process.env);
  return cached;
}

/** For process entry points: validate or print the names and exit. */
export function requireEnvOrExit(processName: string): Env {
  try {
    return getEnv();
  } catch (err) {
    if (err instanceof EnvError) {
      console.error(`[${processName}] ${err.message}`);
      process.exit(1);
    }
    throw err;
  }
}
