import { getDb } from "@/db/client";
import { createEdition, listEditions } from "@/lib/editions/editions";
import { newEditionSchema } from "@/lib/editions/input";
import { json, permission, route } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("editions:use") }, async ({ actor }) => ({ editions: await listEditions(getDb(), actor) }));

export const POST = route({ access: permission("editions:use"), body: newEditionSchema }, async ({ actor, body }) => json(await createEdition(getDb(), actor, body), { status: 201 }));
