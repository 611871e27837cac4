import { getDb } from "@/db/client";
import { permission, route } from "@/lib/http/route";
import { changeRole, roleChangeSchema } from "@/lib/people/people";

export const dynamic = "force-dynamic";

export const POST = route({ access: permission("roles:grant"), body: roleChangeSchema }, async ({ actor, params, body }) => ({
  roles: await changeRole(getDb(), actor, params.id, body),
}));
