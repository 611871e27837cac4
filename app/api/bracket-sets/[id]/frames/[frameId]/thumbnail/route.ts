import { getDb } from "@/db/client";
import { openFrameThumbnail } from "@/lib/bracket-sets";
import { route, SIGNED_IN } from "@/lib/http/route";
import { PRIVATE_NO_STORE } from "@/lib/http/cache";

export const dynamic = "force-dynamic";

// The owner and curators only (others are told it does not exist). A thumbnail's key never
// changes once written, so the browser may keep it; "private" keeps it out of shared caches.
export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => {
  const file = await openFrameThumbnail(getDb(), actor, params.id, params.frameId);
  const headers = new Headers({ "content-type": file.contentType, "cache-control": PRIVATE_NO_STORE, "x-content-type-options": "nosniff" });
  if (file.contentLength !== null) headers.set("content-length", String(file.contentLength));
  return new Response(file.body, { status: 200, headers });
});
