// The demo scenario: the invented Kestrel Ridge Astronomical Society and its
// people. Safe to run on every start: nothing is duplicated or overwritten.
// With SEED_DEMO_BRACKETS=1 (scripts/start.sh sets it; tests never do) it also
// uploads the demo brackets, starts their reductions and composes the two Luxor kits and starts their reductions; that step needs
// the worker running.
import { createDb } from "../client";
import { DEMO_PASSWORD, DEMO_PEOPLE, seedPeople } from "./people";
import { seedSociety } from "./society";
import { nameDemoEclipse, syncEclipseCatalogue } from "./eclipses";

const url = process.argv[2] ?? process.env.DATABASE_URL;
if (!url) {
  console.error("db/seed: DATABASE_URL is missing");
  process.exit(1);
}
// Never in a test database (the names scripts/test.sh uses), whatever the environment says.
const isTestDatabase = /\/crownlight_test(_lane\d{1,2})?$/.test(url);
const withBrackets = process.env.SEED_DEMO_BRACKETS === "1" && !isTestDatabase;
const { db, pool } = createDb(url, 2);
try {
  await seedSociety(db);
  await seedPeople(db);
  const count = await syncEclipseCatalogue(db);
  await nameDemoEclipse(db);
  console.log(`db/seed: eclipse catalogue holds ${count} solar eclipses`);
  console.log("db/seed: demo society ready. Sign in with any of these (password: " + DEMO_PASSWORD + "):");
  for (const p of DEMO_PEOPLE) console.log(`  ${p.email.padEnd(44)} ${p.roles.join(", ")}`);
  if (withBrackets) {
    // Loaded only here: the upload and queue code needs S3 and Redis settings that a plain seed does not.
    const { seedDemoBrackets } = await import("./demo-brackets");
    const { closeQueues } = await import("@/lib/queue/enqueue");
    const { closeProducerRedis } = await import("@/lib/queue/connection");
    const started = Date.now();
    try {
      await seedDemoBrackets(db, (line) => console.log(`db/seed: ${line}`));
      console.log(`db/seed: demo brackets ready in ${((Date.now() - started) / 1000).toFixed(1)} s`);
    } finally {
      await closeQueues();
      await closeProducerRedis();
    }
  }
} finally {
  await pool.end();
}
