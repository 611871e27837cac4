import { getDb } from "@/db/client";
import { listParts, signParts, signPartsSchema } from "@/lib/bracket-sets";
import { permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

// What S3 already holds, so that a reloaded page sends only the missing parts.
export const GET = route({ access: permission("brackets:own") }, async ({ actor, params }) => listParts(getDb(), actor, params.id, params.uploadId));

// Presigned PUT URLs for the given part numbers.
export const POST = route({ access: permission("brackets:own"), body: signPartsSchema }, async ({ actor, params, body }) =>
  signParts(getDb(), actor, params.id, params.uploadId, body.partNumbers),
);
