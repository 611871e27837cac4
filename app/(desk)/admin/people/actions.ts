"use server";
import { revalidatePath } from "next/cache";
import { z } from "zod";
import { serverAction } from "@/app/_server/action";
import { getDb } from "@/db/client";
import { getAuth } from "@/lib/auth/auth";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { invitePerson, setPersonDisabled } from "@/lib/people/accounts";
import { changeRole } from "@/lib/people/people";

const roleSchema = z.enum(ROLES, { error: "is not one of the roles" });

const formSchema = z.object({
  userId: z.string().min(1, { error: "is required" }),
  role: roleSchema,
  grant: z.enum(["true", "false"], { error: "must be grant or revoke" }).transform((v) => v === "true"),
  personName: z.string().max(200).default(""),
});

export const changeRoleAction = serverAction("roles:grant", formSchema, async (actor, input) => {
  await changeRole(getDb(), actor, input.userId, { role: input.role, grant: input.grant });
  revalidatePath("/admin/people");
  const whom = input.personName ? ` ${input.grant ? "to" : "from"} ${input.personName}` : "";
  return `${ROLE_LABELS[input.role]} role ${input.grant ? "granted" : "revoked"}${whom}.`;
});

const disableFormSchema = z.object({
  userId: z.string().min(1, { error: "is required" }),
  disabled: z.enum(["true", "false"], { error: "must be disable or enable" }).transform((v) => v === "true"),
  personName: z.string().max(200).default(""),
});

export const setDisabledAction = serverAction("roles:grant", disableFormSchema, async (actor, input) => {
  await setPersonDisabled(getDb(), actor, input.userId, { disabled: input.disabled });
  revalidatePath("/admin/people");
  return input.disabled ? `${input.personName || "The person"} can no longer sign in.` : `${input.personName || "The person"} can sign in again.`;
});

const inviteFormSchema = z.object({
  name: z.string(),
  email: z.string(),
  // Checkboxes: FormData.getAll gives every ticked role; Object.fromEntries keeps one, so the form sends them joined.
  roles: z.string().default(""),
});

export const inviteAction = serverAction("roles:grant", inviteFormSchema, async (actor, input) => {
  const roles = input.roles.split(",").filter(Boolean);
  const { roles: held } = await invitePerson(getDb(), actor, { name: input.name, email: input.email, roles }, async (email) => {
    await getAuth().api.requestPasswordReset({ body: { email, redirectTo: "/reset-password?invited=1" } });
  });
  revalidatePath("/admin/people");
  return `Invitation sent to ${input.email.trim()}, as ${held.map((r) => ROLE_LABELS[r].toLowerCase()).join(", ")}.`;
});
