import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { exportReviewQueueCsv, queueQuerySchema } from "@/lib/review/queue";

export const dynamic = "force-dynamic";

// The filtered queue as a spreadsheet, with the same filters as the page.
export const GET = route({ access: permission("review:use"), query: queueQuerySchema }, async ({ actor, query }) => {
  const csv = await exportReviewQueueCsv(getDb(), actor, query);
  return new Response(csv, {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": 'attachment; filename="review-queue.csv"', "cache-control": "no-store" },
  });
});
