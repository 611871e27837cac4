import { describe, expect, it } from "vitest";
import { EnvError, parseEnv } from "@/lib/env";

const GOOD = {
  APP_URL: "http://127.0.0.1:3000",
  DATABASE_URL: "postgres://crownlight@127.0.0.1:54329/crownlight",
  REDIS_URL: "redis://127.0.0.1:63790/0",
  S3_ENDPOINT: "http://127.0.0.1:4569",
  S3_REGION: "us-east-1",
  S3_ACCESS_KEY_ID: "S3RVER",
  S3_SECRET_ACCESS_KEY: "S3RVER",
  S3_FORCE_PATH_STYLE: "true",
  S3_BUCKET_ORIGINALS: "crownlight-originals",
  S3_BUCKET_DERIVED: "crownlight-derived",
  S3_BUCKET_EXPORTS: "crownlight-exports",
  SMTP_URL: "smtp://127.0.0.1:2525",
  MAIL_FROM: "Society <a@b.example>",
  BETTER_AUTH_SECRET: "development-only-secret-change-me-0123456789",
  BETTER_AUTH_URL: "http://127.0.0.1:3000",
};

function problemsOf(source: Record<string, string | undefined>) {
  try {
    parseEnv(source);
  } catch (err) {
    expect(err).toBeInstanceOf(EnvError);
    return (err as EnvError).problems;
  }
  throw new Error("expected the environment to be refused");
}

describe("environment validation", () => {
  it("accepts the committed development defaults", () => {
    const env = parseEnv(GOOD);
    expect(env.S3_FORCE_PATH_STYLE).toBe(true);
    expect(env.NODE_ENV).toBe("development");
  });

  it("names a missing variable", () => {
    const problems = problemsOf({ ...GOOD, DATABASE_URL: undefined });
    expect(problems).toEqual([{ name: "DATABASE_URL", message: "is missing" }]);
  });

  it("names a malformed URL and says what was expected", () => {
    const problems = problemsOf({ ...GOOD, REDIS_URL: "http://127.0.0.1:6379" });
    expect(problems[0].name).toBe("REDIS_URL");
    expect(problems[0].message).toContain("redis:");
  });

  it("names a CMYK profile path that does not exist", () => {
    expect(problemsOf({ ...GOOD, EDITION_CMYK_ICC_PROFILE: "/nowhere/press.icc" })).toEqual([{ name: "EDITION_CMYK_ICC_PROFILE", message: "expected the path of a readable ICC profile file" }]);
    expect(parseEnv({ ...GOOD, EDITION_CMYK_ICC_PROFILE: "" }).EDITION_CMYK_ICC_PROFILE).toBe("");
  });

  it("gives the queue prefix and the reduce lock their defaults, and names a bad value", () => {
    const env = parseEnv(GOOD);
    expect(env.QUEUE_PREFIX).toBe("crownlight");
    expect(env.WORKER_REDUCE_LOCK_MS).toBe(600_000);
    expect(env.WORKER_REDUCE_STALLED_INTERVAL_MS).toBe(300_000);
    expect(parseEnv({ ...GOOD, WORKER_REDUCE_LOCK_MS: "60000" }).WORKER_REDUCE_LOCK_MS).toBe(60_000);
    expect(problemsOf({ ...GOOD, WORKER_REDUCE_LOCK_MS: "500" })).toEqual([{ name: "WORKER_REDUCE_LOCK_MS", message: "expected a whole number of milliseconds, at least 1000" }]);
    expect(problemsOf({ ...GOOD, QUEUE_PREFIX: "a b" })[0].name).toBe("QUEUE_PREFIX");
  });

  it("names every bad variable at once", () => {
    const problems = problemsOf({ ...GOOD, SMTP_URL: "nonsense", BETTER_AUTH_SECRET: "short", S3_FORCE_PATH_STYLE: "yes" });
    expect(problems.map((p) => p.name).sort()).toEqual(["BETTER_AUTH_SECRET", "S3_FORCE_PATH_STYLE", "SMTP_URL"]);
  });

  it("refuses the development secret for a public production deployment", () => {
    const problems = problemsOf({ ...GOOD, NODE_ENV: "production", APP_URL: "https://eclipse.kestrel-ridge.example" });
    expect(problems[0].name).toBe("BETTER_AUTH_SECRET");
  });

  it("lets a local production build on loopback keep the development secret", () => {
    expect(parseEnv({ ...GOOD, NODE_ENV: "production" }).NODE_ENV).toBe("production");
  });

  it("puts the variable names in the error message the process prints", () => {
    try {
      parseEnv({ ...GOOD, APP_URL: undefined, MAIL_FROM: undefined });
      throw new Error("not refused");
    } catch (err) {
      expect((err as Error).message).toMatch(/APP_URL is missing/);
      expect((err as Error).message).toMatch(/MAIL_FROM is missing/);
    }
  });

  it("reads TRUSTED_PROXY_HOPS as a small whole number, 0 by default", () => {
    expect(parseEnv(GOOD).TRUSTED_PROXY_HOPS).toBe(0);
    expect(parseEnv({ ...GOOD, TRUSTED_PROXY_HOPS: "2" }).TRUSTED_PROXY_HOPS).toBe(2);
    for (const bad of ["-1", "1.5", "two", "10", " 1"]) {
      expect(problemsOf({ ...GOOD, TRUSTED_PROXY_HOPS: bad })).toEqual([{ name: "TRUSTED_PROXY_HOPS", message: "expected a whole number of proxies from 0 to 9" }]);
    }
  });
});
