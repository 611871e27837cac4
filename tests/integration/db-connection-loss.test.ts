// PostgreSQL ends a connection under a process of ours (a restart, a terminated
// backend): the process goes on, and its next query gets a new connection.
// Without listeners for pg's "error" events (db/client.ts) either loss ended the
// process, the worker with every job it was running. The client runs in a process
// of its own (tests/support/db-loss-probe.ts), so that such an end shows as one.
import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { requireTestDatabase } from "../support/env";
import { startOwnScript, type OwnProcess } from "../support/processes";
import { waitFor } from "../support/wait";

const url = requireTestDatabase();
const admin = getDb();
const probes: OwnProcess[] = [];

afterAll(async () => {
  for (const p of probes) await p.kill("SIGKILL");
  await closeDb();
});

async function runProbe(probeCase: "idle" | "transaction"): Promise<string> {
  const name = `loss-${probeCase}-${randomUUID().slice(0, 8)}`;
  const probe = await startOwnScript(
    name,
    "tests/support/db-loss-probe.ts",
    { PROBE_DATABASE_URL: `${url}${url.includes("?") ? "&" : "?"}application_name=${name}`, PROBE_CASE: probeCase },
    "ready",
  );
  probes.push(probe);
  // Every backend of the probe ended from another connection, as a restart would.
  const ended = await admin.execute(sql`select pg_terminate_backend(pid) from pg_stat_activity where application_name = ${name}`);
  expect(ended.rows).toHaveLength(1);
  await waitFor(`the ${probeCase} probe to end`, async () => (probe.isRunning() ? undefined : true), 30_000, 100);
  return probe.readLog();
}

describe("a database connection lost under the process", () => {
  it("survives losing an idle connection, and the next query gets a new one", async () => {
    const log = await runProbe("idle");
    expect(log.match(/a connection to PostgreSQL was lost/g)).toHaveLength(1);
    expect(log).toContain('after the loss: [{"two":2}]');
  });

  it("fails only the transaction whose connection is lost, and goes on", async () => {
    const log = await runProbe("transaction");
    expect(log).toMatch(/transaction failed: /);
    expect(log).toContain('after the loss: [{"two":2}]');
  });
});
