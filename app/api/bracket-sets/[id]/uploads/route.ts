import { getDb } from "@/db/client";
import { startFrameUpload, startUploadSchema } from "@/lib/bracket-sets";
import { json, permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("brackets:own"), body: startUploadSchema }, async ({ actor, params, body }) =>
  json(await startFrameUpload(getDb(), actor, params.id, body), { status: 201 }),
);
