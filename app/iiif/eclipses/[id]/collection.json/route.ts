import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { eclipseCollectionResponse } from "@/lib/plates/documents";

export const dynamic = "force-dynamic";

export const GET = route({ access: PUBLIC }, async ({ params }) => eclipseCollectionResponse(getDb(), params.id));
