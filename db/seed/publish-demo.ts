// `node --import tsx db/seed/publish-demo.ts`: publishes the demo reductions and
// the demo composite as plates once they have finished (scripts/start.sh runs it after the app is up),
// then lays them out in the editor's draft edition.
import { createDb } from "@/db/client";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { seedDemoEdition } from "./demo-edition";
import { publishDemoComposite } from "./demo-composite";
import { publishDemoPlates } from "./demo-plates";

const url = process.env.DATABASE_URL;
if (!url) {
  console.error("db/seed/publish-demo: DATABASE_URL is not set");
  process.exit(1);
}
if (/\/crownlight_test(_lane\d{1,2})?$/.test(url)) {
  console.log("db/seed/publish-demo: not in a test database");
  process.exit(0);
}
const { db, pool } = createDb(url, 2);
try {
  await publishDemoPlates(db, (line) => console.log(`db/seed: ${line}`));
  await publishDemoComposite(db, (line) => console.log(`db/seed: ${line}`));
  await seedDemoEdition(db, (line) => console.log(`db/seed: ${line}`));
} finally {
  await closeWebJpegWriter();
  await pool.end();
}
