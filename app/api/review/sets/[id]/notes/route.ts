import { getDb } from "@/db/client";
import { json, permission, route } from "@/lib/http/route";
import { addCuratorNote, listCuratorNotes, noteSchema } from "@/lib/review/history";

export const dynamic = "force-dynamic";

// Curators' private notes on a set: never shown to the photographer.
export const GET = route({ access: permission("review:use") }, async ({ actor, params }) => ({ notes: await listCuratorNotes(getDb(), actor, params.id) }));

export const POST = route({ access: permission("review:use"), body: noteSchema }, async ({ actor, params, body }) =>
  json(await addCuratorNote(getDb(), actor, params.id, body), { status: 201 }),
);
