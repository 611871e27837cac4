// Redis connections for BullMQ. Workers need maxRetriesPerRequest: null; a
// producer gives up after a few retries instead, so a request never hangs on a
// Redis outage. Commands issued while connecting wait in the offline queue.
import IORedis, { type Redis } from "ioredis";

export function createRedis(url: string, forWorker: boolean): Redis {
  const redis = new IORedis(url, {
    maxRetriesPerRequest: forWorker ? null : 2,
    enableOfflineQueue: true,
    connectTimeout: 5000,
    lazyConnect: false,
  });
  // ioredis reconnects by itself; say so once per outage instead of once per attempt
  // (an unhandled "error" event would print every reconnection attempt).
  let isDown = false;
  redis.on("error", (err: Error) => {
    if (isDown) return;
    isDown = true;
    console.warn(`redis: ${err.message}; reconnecting`);
  });
  redis.on("ready", () => {
    if (isDown) console.warn("redis: connected again");
    isDown = false;
  });
  return redis;
}

let producer: Redis | undefined;

export function getProducerRedis(): Redis {
  if (!producer) {
    const url = process.env.REDIS_URL;
    if (!url) throw new Error("REDIS_URL is missing");
    producer = createRedis(url, false);
  }
  return producer;
}

export async function closeProducerRedis(): Promise<void> {
  if (producer) {
    producer.disconnect();
    producer = undefined;
  }
}
