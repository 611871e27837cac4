import { getDb } from "@/db/client";
import { listExports, startExport, startExportSchema } from "@/lib/editions/export/exports";
import { json, permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("editions:use") }, async ({ actor, params }) => ({ exports: await listExports(getDb(), actor, params.id) }));

/** Starts a print bundle; the answer is the queued export, to be followed with GET .../exports/{exportId}. */
export const POST = route({ access: permission("editions:use"), body: startExportSchema }, async ({ actor, params, body }) => json({ export: await startExport(getDb(), actor, params.id, body) }, { status: 202 }));
