import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { reportAnswerSchema } from "@/lib/plates/desk-input";
import { answerPlateReport } from "@/lib/plates/reports";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("review:use"), body: reportAnswerSchema }, async ({ actor, params, body }) => {
  await answerPlateReport(getDb(), actor, params.id, params.reportId, body);
  return { ok: true };
});
