// A worker process for the toy stepped flow (tests/support/toy-flow.ts): the
// production dispatcher and mirror (worker/dispatch.ts) on the toy queue, with a
// short lock so that a killed process's job is taken again within seconds.
// Started by tests/integration/stepped-flow.test.ts with its own queue prefix.
import { Worker } from "bullmq";
import { closeDb, getDb } from "@/db/client";
import { createRedis } from "@/lib/queue/connection";
import { createDispatcher, mirrorOutcomes } from "@/worker/dispatch";
import { TOY_JOBS, TOY_QUEUE, toyFlow } from "./toy-flow";

const redisUrl = process.env.REDIS_URL;
const prefix = process.env.QUEUE_PREFIX;
if (!redisUrl || !prefix) {
  console.error("[toy-worker] REDIS_URL and QUEUE_PREFIX are needed");
  process.exit(1);
}
const db = getDb();
const connection = createRedis(redisUrl, true);
const dispatcher = createDispatcher({ db, connection, prefix, jobs: TOY_JOBS, handlers: { "toy.run": toyFlow.runParent, "toy.part": toyFlow.runPart } });
// Lock renewed every 2.5 s; a dead process's job is found by the stalled check 5 to 9 s after its last renewal.
const worker = new Worker(TOY_QUEUE, dispatcher.process, { connection, prefix, concurrency: 1, lockDuration: 5000, stalledInterval: 2000 });
mirrorOutcomes(worker, db, "toy-worker");
await worker.waitUntilReady();
console.log(`[toy-worker] listening as ${process.pid}`);

process.on("SIGTERM", () => {
  void (async () => {
    await worker.close();
    await dispatcher.close();
    connection.disconnect();
    await closeDb();
    process.exit(0);
  })();
});
