import { getDb } from "@/db/client";
import { openExportDownload } from "@/lib/editions/export/exports";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

/** The finished ZIP, for editors only; private, never cached by shared caches. */
export const GET = route({ access: permission("editions:use") }, async ({ actor, params }) => {
  const file = await openExportDownload(getDb(), actor, params.id, params.exportId);
  const headers = new Headers({
    "content-type": "application/zip",
    "content-disposition": `attachment; filename="${file.fileName}"`,
    "cache-control": "private, no-store",
    "x-content-type-options": "nosniff",
  });
  if (file.contentLength !== undefined) headers.set("content-length", String(file.contentLength));
  return new Response(file.body, { status: 200, headers });
});
