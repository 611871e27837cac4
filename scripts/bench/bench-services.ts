// What a benchmark that runs through the app needs before it starts: the same
// environment the scripts export (.env.example, then .env, and what the caller
// already exported wins, as scripts/lib/common.sh load_env does), the local
// services (started with scripts/services.sh only when one does not answer; the
// bench never stops them), the development database migrated (db/migrate.ts, as
// scripts/start.sh runs it) and its eclipse catalogue, which bracket sets refer to.
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { connect } from "node:net";
import { join } from "node:path";
import { parseEnv } from "node:util";
import { getDb } from "@/db/client";
import { syncEclipseCatalogue } from "@/db/seed/eclipses";

/** Sets every variable of .env.example and .env that the environment does not already hold. */
export function loadDevelopmentEnv(root: string): void {
  const merged: Record<string, string> = {};
  for (const file of [".env.example", ".env"]) {
    const path = join(root, file);
    if (existsSync(path)) Object.assign(merged, parseEnv(readFileSync(path, "utf8")));
  }
  for (const [key, value] of Object.entries(merged)) if (process.env[key] === undefined) process.env[key] = value;
}

function answers(host: string, port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = connect({ host, port });
    const done = (ok: boolean) => {
      socket.destroy();
      resolve(ok);
    };
    socket.setTimeout(2000, () => done(false));
    socket.once("connect", () => done(true));
    socket.once("error", () => done(false));
  });
}

function portOf(url: string | undefined, name: string): { host: string; port: number } {
  if (!url) throw new Error(`${name} is missing from the environment (.env.example sets it)`);
  const parsed = new URL(url);
  return { host: parsed.hostname, port: Number(parsed.port) };
}

/**
 * The services the app needs, started the way the scripts start them when one does not
 * answer; then the development database migrated and its eclipse catalogue present.
 */
export async function prepareDevelopmentServices(root: string, log: (line: string) => void): Promise<void> {
  loadDevelopmentEnv(root);
  const wanted = [
    { name: "PostgreSQL", ...portOf(process.env.DATABASE_URL, "DATABASE_URL") },
    { name: "Redis", ...portOf(process.env.REDIS_URL, "REDIS_URL") },
    { name: "the S3 fake", ...portOf(process.env.S3_ENDPOINT, "S3_ENDPOINT") },
  ];
  const silent = [];
  for (const s of wanted) if (!(await answers(s.host, s.port))) silent.push(s.name);
  if (silent.length > 0) {
    log(`${silent.join(", ")} did not answer: starting the services with scripts/services.sh`);
    execFileSync("bash", [join(root, "scripts/services.sh"), "start"], { cwd: root, stdio: ["ignore", "inherit", "inherit"] });
  }
  execFileSync(process.execPath, ["--import", "tsx", join(root, "db/migrate.ts")], { cwd: root, stdio: ["ignore", "ignore", "inherit"] });
  await syncEclipseCatalogue(getDb());
}
