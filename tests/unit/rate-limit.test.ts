import RedisMock from "ioredis-mock";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { createRedisRateStore } from "@/lib/rate-limit/redis-store";

describe("Redis rate store", () => {
  let redis: InstanceType<typeof RedisMock>;
  beforeEach(() => {
    redis = new RedisMock();
  });
  afterEach(async () => {
    await redis.flushall();
    redis.disconnect();
  });

  it("allows max requests in a window and refuses the next with a retry time", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    const rule = { window: 60, max: 3 };
    for (let i = 0; i < 3; i++) expect((await store.consume("ip|/sign-in/email", rule)).allowed).toBe(true);
    const refused = await store.consume("ip|/sign-in/email", rule);
    expect(refused.allowed).toBe(false);
    expect(refused.retryAfter).toBeGreaterThan(0);
    expect(refused.retryAfter).toBeLessThanOrEqual(60);
  });

  it("peeks at a count without adding to it", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    expect(await store.peek("sign-in-failures:a@b.example")).toEqual({ count: 0, retryAfter: null });
    for (let i = 0; i < 2; i++) await store.consume("sign-in-failures:a@b.example", { window: 900, max: 10 });
    const seen = await store.peek("sign-in-failures:a@b.example");
    expect(seen.count).toBe(2);
    expect(seen.retryAfter).toBeGreaterThan(0);
    expect((await store.peek("sign-in-failures:a@b.example")).count).toBe(2);
  });

  it("keeps separate counts per key", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    const rule = { window: 60, max: 1 };
    expect((await store.consume("a", rule)).allowed).toBe(true);
    expect((await store.consume("b", rule)).allowed).toBe(true);
    expect((await store.consume("a", rule)).allowed).toBe(false);
  });

  it("sets an expiry so the window frees up", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    await store.consume("k", { window: 30, max: 5 });
    const ttl = await redis.ttl("t:k");
    expect(ttl).toBeGreaterThan(0);
    expect(ttl).toBeLessThanOrEqual(30);
  });

  it("frees the key on reset", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    const rule = { window: 60, max: 1 };
    expect((await store.consume("w", rule)).allowed).toBe(true);
    expect((await store.consume("w", rule)).allowed).toBe(false);
    await store.reset("w");
    expect((await store.consume("w", rule)).allowed).toBe(true);
  });

  it("refuses a rule without a positive window", async () => {
    const store = createRedisRateStore(redis as never, "t:");
    await expect(store.consume("x", { window: 0, max: 1 })).rejects.toThrow(/positive window/);
  });
});
