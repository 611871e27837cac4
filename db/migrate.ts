// Applies the committed migrations to DATABASE_URL (or the URL given as the
// first argument). Run by the start and test commands.
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { createDb } from "./client";

const url = process.argv[2] ?? process.env.DATABASE_URL;
if (!url) {
  console.error("db/migrate: DATABASE_URL is missing");
  process.exit(1);
}
const { db, pool } = createDb(url, 1);
try {
  await migrate(db, { migrationsFolder: new URL("./migrations", import.meta.url).pathname });
  console.log(`db/migrate: ${new URL(url).pathname.slice(1)} is up to date`);
} finally {
  await pool.end();
}
