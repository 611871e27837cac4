import { getDb } from "@/db/client";
import { abortFrameUpload } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const DELETE = route({ access: permission("brackets:own") }, async ({ actor, params }) =>
  abortFrameUpload(getDb(), actor, params.id, params.uploadId),
);
