// A fixed-window rate limiter kept in Redis, shared by every web process.
// consume() counts and decides in one round trip (MULTI), so concurrent
// requests cannot all pass on a stale read. better-auth uses it through
// rateLimit.customStorage; it is a plain helper for anything else too.
import type { Redis } from "ioredis";

export interface RateRule {
  /** Window length in seconds. */
  window: number;
  max: number;
}

export interface RateDecision {
  allowed: boolean;
  /** Seconds until the window frees up, when refused. */
  retryAfter: number | null;
}

export function createRedisRateStore(redis: Redis, prefix = "crownlight:rate:") {
  return {
    async consume(key: string, rule: RateRule): Promise<RateDecision> {
      if (!(rule.window > 0) || !(rule.max > 0)) throw new Error(`rate rule for ${key} needs a positive window and max`);
      const k = prefix + key;
      const res = await redis.multi().incr(k).ttl(k).exec();
      if (!res) throw new Error("rate limiter: Redis transaction was aborted");
      const count = Number(res[0][1]);
      let ttl = Number(res[1][1]);
      if (ttl < 0) {
        await redis.expire(k, rule.window);
        ttl = rule.window;
      }
      if (count <= rule.max) return { allowed: true, retryAfter: null };
      return { allowed: false, retryAfter: ttl };
    },
    /** The count so far in the current window, and seconds left in it; nothing is counted. */
    async peek(key: string): Promise<{ count: number; retryAfter: number | null }> {
      const res = await redis.multi().get(prefix + key).ttl(prefix + key).exec();
      if (!res) throw new Error("rate limiter: Redis transaction was aborted");
      const ttl = Number(res[1][1]);
      return { count: Number(res[0][1] ?? 0), retryAfter: ttl > 0 ? ttl : null };
    },
    async reset(key: string): Promise<void> {
      await redis.del(prefix + key);
    },
  };
}
