"use server";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { changeRole } from "@/lib/people/people";

const formSchema = z.object({
  userId: z.string().min(1, { error: "is required" }),
  role: z.enum(ROLES, { error: `expected one of ${ROLES.join(", ")}` }),
  grant: z.enum(["true", "false"], { error: "expected true or false" }).transform((v) => v === "true"),
});

export const changeRoleAction = serverAction("roles:grant", formSchema, async (actor, input) => {
  await changeRole(getDb(), actor, input.userId, { role: input.role, grant: input.grant });
  revalidatePath("/admin/people");
  return `${ROLE_LABELS[input.role]} ${input.grant ? "granted" : "revoked"}.`;
});
