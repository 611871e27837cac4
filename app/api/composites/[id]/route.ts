import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { findComposite } from "@/lib/composites/composites";

export const dynamic = "force-dynamic";

// State and progress, read from PostgreSQL (the worker writes them there); the composite's page polls this.
export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => findComposite(getDb(), actor, params.id));
