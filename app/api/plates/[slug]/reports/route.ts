import { getDb } from "@/db/client";
import { clientAddressOf } from "@/lib/http/client-address";
import { json, PUBLIC, route } from "@/lib/http/route";
import { plateReportSchema } from "@/lib/plates/desk-input";
import { submitPlateReport } from "@/lib/plates/reports";
import { getProducerRedis } from "@/lib/queue/connection";
import { createRedisRateStore } from "@/lib/rate-limit/redis-store";

export const dynamic = "force-dynamic";

// Visitors report without an account; the limiter keeps scripts from flooding curators' mail.
export const POST = route({ access: PUBLIC, body: plateReportSchema }, async ({ req, params, body }) => {
  const address = clientAddressOf(req.headers);
  const limiter = createRedisRateStore(getProducerRedis(), "crownlight:report-rate:");
  return json(await submitPlateReport(getDb(), params.slug, body, { address, limiter }), { status: 201 });
});
