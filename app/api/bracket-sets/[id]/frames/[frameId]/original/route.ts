import { getDb } from "@/db/client";
import { attachmentDisposition, openFrameOriginal } from "@/lib/bracket-sets";
import { route, SIGNED_IN } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// The original as uploaded, streamed from S3 as a download under its own file name; refused
// frames too, so the owner can get a file back. The owner and curators only.
export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => {
  const file = await openFrameOriginal(getDb(), actor, params.id, params.frameId);
  const headers = new Headers({
    "content-type": file.contentType,
    "content-disposition": attachmentDisposition(file.fileName),
    "cache-control": "private, no-store",
    "x-content-type-options": "nosniff",
  });
  if (file.contentLength !== null) headers.set("content-length", String(file.contentLength));
  return new Response(file.body, { status: 200, headers });
});
