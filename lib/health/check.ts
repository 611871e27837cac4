// Reachability of every service the app needs, each with a time limit, for
// monitoring: all up answers 200, any down answers 503 with which one.
import { getEnv } from "@/lib/env";
import net from "node:net";
import { sql } from "drizzle-orm";
import { getDb } from "@/db/client";
import { getProducerRedis } from "@/lib/queue/connection";
import { bucketName, checkBucket } from "@/lib/storage";

export type ServiceName = "postgres" | "redis" | "s3" | "smtp";

export interface ServiceHealth {
  name: ServiceName;
  ok: boolean;
  latencyMs: number;
  detail?: string;
}

export interface HealthReport {
  ok: boolean;
  checkedAt: string;
  services: ServiceHealth[];
}

const LIMIT_MS = 2000;

async function timed(name: ServiceName, probe: () => Promise<unknown>): Promise<ServiceHealth> {
  const start = performance.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      probe(),
      new Promise((_, reject) => {
        timer = setTimeout(() => reject(new Error(`no answer within ${LIMIT_MS} ms`)), LIMIT_MS);
      }),
    ]);
    return { name, ok: true, latencyMs: Math.round(performance.now() - start) };
  } catch (err) {
    // Only the kind of fault is reported; addresses and credentials stay in the log.
    console.error(`health: ${name} unreachable`, err);
    return { name, ok: false, latencyMs: Math.round(performance.now() - start), detail: "unreachable" };
  } finally {
    clearTimeout(timer);
  }
}

/** Opens a TCP connection to the SMTP relay and waits for its 220 greeting. */
function probeSmtp(url: string): Promise<void> {
  const u = new URL(url);
  const port = Number(u.port || (u.protocol === "smtps:" ? 465 : 25));
  return new Promise((resolve, reject) => {
    const socket = net.connect({ host: u.hostname, port });
    socket.once("data", (buf) => {
      socket.end("QUIT\r\n");
      if (buf.toString().startsWith("220")) resolve();
      else reject(new Error("unexpected SMTP greeting"));
    });
    socket.once("error", reject);
    socket.setTimeout(LIMIT_MS, () => socket.destroy(new Error("timeout")));
  });
}

export async function checkHealth(): Promise<HealthReport> {
  const services = await Promise.all([
    timed("postgres", () => getDb().execute(sql`select 1`)),
    timed("redis", () => getProducerRedis().ping()),
    timed("s3", () => checkBucket(bucketName("originals"))),
    timed("smtp", () => probeSmtp(getEnv().SMTP_URL)),
  ]);
  return { ok: services.every((s) => s.ok), checkedAt: new Date().toISOString(), services };
}
