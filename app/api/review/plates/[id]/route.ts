import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { updatePlate } from "@/lib/plates/desk";
import { plateEditSchema } from "@/lib/plates/desk-input";
import { findDeskPlate } from "@/lib/plates/desk-view";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("review:use") }, async ({ actor, params }) => ({ plate: await findDeskPlate(getDb(), actor, params.id) }));

export const PATCH = route({ access: permission("review:use"), body: plateEditSchema }, async ({ actor, params, body }) => ({ changed: await updatePlate(getDb(), actor, params.id, body) }));
