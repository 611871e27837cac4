import { afterAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { checkHealth } from "@/lib/health/check";
import { closeProducerRedis } from "@/lib/queue/connection";
import { APP, requireTestDatabase } from "../support/env";

requireTestDatabase();
afterAll(async () => {
  await closeProducerRedis();
  await closeDb();
});

describe("health", () => {
  it("answers 200 from the running app with every service reachable", async () => {
    const res = await fetch(`${APP}/api/health`);
    expect(res.status).toBe(200);
    const body = (await res.json()) as { ok: boolean; services: { name: string; ok: boolean }[] };
    expect(body.ok).toBe(true);
    expect(body.services.map((s) => s.name).sort()).toEqual(["postgres", "redis", "s3", "smtp"]);
    expect(body.services.every((s) => s.ok)).toBe(true);
  });

  it("reports a service that does not answer, without leaking its address", async () => {
    const saved = process.env.SMTP_URL;
    process.env.SMTP_URL = "smtp://127.0.0.1:9"; // discard port: nothing listens there
    try {
      const report = await checkHealth();
      expect(report.ok).toBe(false);
      const smtp = report.services.find((s) => s.name === "smtp");
      expect(smtp?.ok).toBe(false);
      expect(JSON.stringify(report)).not.toContain("127.0.0.1");
      expect(report.services.find((s) => s.name === "postgres")?.ok).toBe(true);
    } finally {
      process.env.SMTP_URL = saved;
    }
  });
});
