// A process of its own for tests/integration/db-connection-loss.test.ts: it opens the
// app's database client (db/client.ts), says "ready", and waits for the test to end
// its connection from outside. PROBE_CASE "idle": the connection is lost while it
// sits in the pool; "transaction": while a transaction holds it between two queries.
// Then it queries again and prints what it got. A lost connection that ended the
// process would leave no "after the loss" line.
import { sql } from "drizzle-orm";
import { createDb } from "@/db/client";

const { db, pool } = createDb(process.env.PROBE_DATABASE_URL!, 2);
const lost = async () => {
  const deadline = Date.now() + 20_000;
  while (pool.totalCount > 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
};

if (process.env.PROBE_CASE === "transaction") {
  const outcome = await db
    .transaction(async (tx) => {
      await tx.execute(sql`select 1`);
      console.log("ready");
      // The test ends the connection now; the transaction's next query meets it.
      await new Promise((r) => setTimeout(r, 2000));
      await tx.execute(sql`select 1`);
    })
    .then(() => "committed", (err: Error) => `failed: ${err.message}`);
  console.log(`transaction ${outcome}`);
} else {
  await db.execute(sql`select 1`);
  console.log("ready");
  await lost();
}
const res = await db.execute(sql`select 2 as two`);
console.log(`after the loss: ${JSON.stringify(res.rows)}`);
await pool.end();
