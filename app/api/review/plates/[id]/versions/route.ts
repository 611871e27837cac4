import { getDb } from "@/db/client";
import { json, permission, route } from "@/lib/http/route";
import { addPlateVersion } from "@/lib/plates/desk";
import { newVersionSchema } from "@/lib/plates/desk-input";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("review:use"), body: newVersionSchema }, async ({ actor, params, body }) => json(await addPlateVersion(getDb(), actor, params.id, body), { status: 201 }));
