import { getDb } from "@/db/client";
import { findExport } from "@/lib/editions/export/exports";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** One export's state and progress, polled by the edition page. */
export const GET = route({ access: permission("editions:use") }, async ({ actor, params }) => ({ export: await findExport(getDb(), actor, params.id, params.exportId) }));
