// The Drizzle client over a pg pool. Queries elsewhere take `db` (or a
// transaction) as their first argument so tests can pass their own.
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

export function createDb(connectionString: string, max = 10): { db: Db; pool: Pool } {
  const pool = new Pool({ connectionString, max });
  // A connection that PostgreSQL ends (a restart, a terminated backend, a network reset) makes pg
  // emit "error": on the pool for an idle client, on the client itself for one checked out (drizzle's
  // transactions hold one). Without listeners that error ends the process, the worker with every job
  // it runs; with them the pool drops the client and opens another for the next query, and a query
  // in flight fails on its own, as a transient fault that its job retries.
  // The client's own listener logs each loss once; the pool passes an idle client's on as well.
  pool.on("error", () => undefined);
  pool.on("connect", (client) => {
    client.on("error", (err) => console.error(`[db] a connection to PostgreSQL was lost: ${err.message}`));
  });
  return { db: drizzle(pool, { schema, casing: "snake_case" }), pool };
}

let shared: { db: Db; pool: Pool } | undefined;

/** The process-wide database, from DATABASE_URL. */
export function getDb(): Db {
  if (!shared) {
    const url = process.env.DATABASE_URL;
    if (!url) throw new Error("DATABASE_URL is missing");
    shared = createDb(url);
  }
  return shared.db;
}

export async function closeDb(): Promise<void> {
  if (shared) {
    await shared.pool.end();
    shared = undefined;
  }
}
