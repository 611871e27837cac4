import { getDb } from "@/db/client";
import { completeFrameUpload } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// The server lists the parts itself, so the body carries nothing.
export const POST = route({ access: permission("brackets:own") }, async ({ actor, params }) =>
  completeFrameUpload(getDb(), actor, params.id, params.uploadId),
);
