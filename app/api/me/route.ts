import { allowedActions } from "@/lib/auth/permissions";
import { route, SIGNED_IN } from "@/lib/http/route";

export const dynamic = "force-dynamic";

export const GET = route({ access: SIGNED_IN }, async ({ actor }) => {
  const a = actor!;
  return { id: a.userId, name: a.name, email: a.email, roles: a.roles, can: allowedActions(a.roles) };
});
