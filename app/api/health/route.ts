import { checkHealth } from "@/lib/health/check";
import { json, PUBLIC, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// Public on purpose: monitoring reads the status code; the body names services only.
export const GET = route({ access: PUBLIC }, async () => {
  const report = await checkHealth();
  return json(report, { status: report.ok ? 200 : 503 });
});
