// The demo scenario: the invented Kestrel Ridge Astronomical Society and its
// people. Safe to run on every start: nothing is duplicated or overwritten.
import { createDb } from "../client";
import { DEMO_PASSWORD, DEMO_PEOPLE, seedPeople } from "./people";
import { seedSociety } from "./society";
import { nameDemoEclipse, syncEclipseCatalogue } from "./eclipses";

const url = process.argv[2] ?? process.env.DATABASE_URL;
if (!url) {
  console.error("db/seed: DATABASE_URL is missing");
  process.exit(1);
}
const { db, pool } = createDb(url, 2);
try {
  await seedSociety(db);
  await seedPeople(db);
  const count = await syncEclipseCatalogue(db);
  await nameDemoEclipse(db);
  console.log(`db/seed: eclipse catalogue holds ${count} solar eclipses`);
  console.log("db/seed: demo society ready. Sign in with any of these (password: " + DEMO_PASSWORD + "):");
  for (const p of DEMO_PEOPLE) console.log(`  ${p.email.padEnd(44)} ${p.roles.join(", ")}`);
} finally {
  await pool.end();
}
