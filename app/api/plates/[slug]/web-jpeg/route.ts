import { z } from "zod";
import { getDb } from "@/db/client";
import { PUBLIC, route } from "@/lib/http/route";
import { serveWebJpeg } from "@/lib/plates/web-jpeg";
import { strictNumber } from "@/lib/strict-number";

export const dynamic = "force-dynamic";

const querySchema = z.object({ version: strictNumber(z.number({ error: "expected a version number" }).int().min(1, { error: "versions start at 1" }).max(10_000).optional()) });

// Published plates only: a draft or withdrawn plate answers 404.
export const GET = route({ access: PUBLIC, query: querySchema }, async ({ params, query }) => serveWebJpeg(getDb(), params.slug, query.version));
