import { z } from "zod";
import { getDb } from "@/db/client";
import { PLATE_STATES } from "@/db/schema/plates";
import { json, permission, route } from "@/lib/http/route";
import { createDraftPlate } from "@/lib/plates/desk";
import { draftPlateSchema } from "@/lib/plates/desk-input";
import { listDeskPlates } from "@/lib/plates/desk-view";

export const dynamic = "force-dynamic";

const querySchema = z.object({ state: z.enum(PLATE_STATES, { error: "expected draft, published or withdrawn" }).optional() });

export const GET = route({ access: permission("review:use"), query: querySchema }, async ({ actor, query }) => ({ plates: await listDeskPlates(getDb(), actor, query.state) }));

export const POST = route({ access: permission("review:use"), body: draftPlateSchema }, async ({ actor, body }) => json(await createDraftPlate(getDb(), actor, body), { status: 201 }));
