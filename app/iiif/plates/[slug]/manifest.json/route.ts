import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { plateManifestResponse } from "@/lib/plates/documents";

export const dynamic = "force-dynamic";

export const GET = route({ access: PUBLIC }, async ({ params }) => plateManifestResponse(getDb(), params.slug));
