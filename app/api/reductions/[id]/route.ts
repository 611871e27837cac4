import { getDb } from "@/db/client";
import { route, SIGNED_IN } from "@/lib/http/route";
import { findReduction } from "@/lib/reductions/reductions";

export const dynamic = "force-dynamic";

// State and progress, read from PostgreSQL (the worker mirrors them there); pages poll this.
export const GET = route({ access: SIGNED_IN }, async ({ actor, params }) => findReduction(getDb(), actor, params.id));
