import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { listPeople, peopleQuerySchema } from "@/lib/people/people";

export const dynamic = "force-dynamic";

export const GET = route({ access: permission("people:list"), query: peopleQuerySchema }, async ({ actor, query }) =>
  listPeople(getDb(), actor, query),
);
