// Processes a fault test owns: its own worker (node --import tsx worker/index.ts, or another script of ours)
// with its own queue prefix, and its own redis-server (Debian's binary) in a
// temporary folder. Each runs in a process group of its own, so a kill reaches
// every child, and only processes started here are ever signalled.
import { spawn, type ChildProcess } from "node:child_process";
import { createWriteStream } from "node:fs";
import { mkdtemp, readFile } from "node:fs/promises";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { waitFor } from "./wait";

export interface OwnProcess {
  readonly pid: number;
  readonly logPath: string;
  /** Signals the whole process group and waits for the leader to exit. */
  kill(signal: NodeJS.Signals): Promise<void>;
  isRunning(): boolean;
  readLog(): Promise<string>;
}

function track(child: ChildProcess, logPath: string): OwnProcess {
  let exited = false;
  const exit = new Promise<void>((resolve) => {
    child.once("exit", () => {
      exited = true;
      resolve();
    });
  });
  return {
    pid: child.pid!,
    logPath,
    isRunning: () => !exited,
    readLog: () => readFile(logPath, "utf8").catch(() => ""),
    async kill(signal) {
      if (exited) return;
      try {
        process.kill(-child.pid!, signal);
      } catch {
        // Already gone.
      }
      await exit;
    },
  };
}

function spawnLogged(command: string, args: string[], env: NodeJS.ProcessEnv, logPath: string): ChildProcess {
  const log = createWriteStream(logPath, { flags: "a" });
  const child = spawn(command, args, { cwd: process.cwd(), env, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  child.stdout!.pipe(log);
  child.stderr!.pipe(log);
  return child;
}

/** A free TCP port on loopback, chosen by the kernel. */
export async function findFreePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

/**
 * Our own worker: the production entry point with the test world's env, a queue
 * prefix of its own (so the suite's shared worker never takes these jobs) and any
 * overrides. Resolves once it says it is listening.
 */
export async function startOwnWorker(name: string, env: Record<string, string>): Promise<OwnProcess> {
  return startOwnScript(name, "worker/index.ts", env, "[worker] listening");
}

/** Any TypeScript entry point of ours (run through tsx), with the test world's env and overrides; resolves once its log shows `ready`. */
export async function startOwnScript(name: string, script: string, env: Record<string, string>, ready: string): Promise<OwnProcess> {
  const dir = await mkdtemp(join(tmpdir(), `crownlight-${name}-`));
  const logPath = join(dir, "process.log");
  // Through the same malloc tuning as the app's own worker (scripts/lib/app.sh).
  const child = spawnLogged("bash", ["scripts/with-malloc-tuning.sh", process.execPath, "--import", "tsx", script], { ...process.env, ...env }, logPath);
  const own = track(child, logPath);
  await waitFor(`${name} to start`, async () => {
    if (!own.isRunning()) throw new Error(`${name} exited at start:\n${await own.readLog()}`);
    return (await own.readLog()).includes(ready) ? true : undefined;
  }, 60_000);
  return own;
}

export interface OwnRedis {
  readonly port: number;
  readonly url: string;
  readonly dir: string;
  /** Ends redis-server with SIGKILL (no shutdown save: only what the append-only file holds survives). */
  crash(): Promise<void>;
  /** Starts it again on the same port and folder. */
  start(): Promise<void>;
  stop(): Promise<void>;
}

/**
 * A private redis-server with append-only persistence fsynced on every write
 * (appendfsync always), no RDB snapshots, data in a temporary folder.
 */
export async function startOwnRedis(): Promise<OwnRedis> {
  const port = await findFreePort();
  const dir = await mkdtemp(join(tmpdir(), "crownlight-redis-"));
  let current: OwnProcess | undefined;
  const args = ["--bind", "127.0.0.1", "--port", String(port), "--dir", dir, "--appendonly", "yes", "--appendfsync", "always", "--save", "", "--maxmemory-policy", "noeviction"];
  const start = async () => {
    const child = spawnLogged("/usr/bin/redis-server", args, process.env, join(dir, "redis.log"));
    current = track(child, join(dir, "redis.log"));
    const proc = current;
    await waitFor(`redis-server on port ${port}`, async () => {
      if (!proc.isRunning()) throw new Error(`redis-server exited at start:\n${await proc.readLog()}`);
      return (await proc.readLog()).includes("Ready to accept connections") ? true : undefined;
    }, 30_000);
  };
  await start();
  return {
    port,
    url: `redis://127.0.0.1:${port}/0`,
    dir,
    crash: async () => current?.kill("SIGKILL"),
    start,
    stop: async () => current?.kill("SIGTERM"),
  };
}
