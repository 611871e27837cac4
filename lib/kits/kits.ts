// Members' camera and optics profiles. Every function takes the actor; a member
// sees and changes only their own kits.
import { and, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db/client";
import { kits, MOUNTS, type Kit } from "@/db/schema";
import { requirePermission, type Actor } from "@/lib/auth/actor";
import { findOwnRow, listOwnRows } from "@/lib/auth/own-rows";
import { strictNumber } from "@/lib/strict-number";

// Form fields arrive as strings: numbers are read strictly (lib/strict-number.ts), checkboxes are "on" or absent.
const positive = (what: string, max: number) =>
  z
    .number({ error: `expected a number (${what})` })
    .gt(0, { error: `must be greater than 0 (${what})` })
    .max(max, { error: `must be at most ${max} (${what})` });
const checkbox = z.union([z.literal("on"), z.literal("true"), z.literal("false"), z.boolean()]).optional().transform((v) => v === true || v === "on" || v === "true");

export const kitInputSchema = z.object({
  name: z.string().trim().min(2, { error: "needs at least 2 characters" }).max(80),
  camera: z.string().trim().min(2, { error: "needs at least 2 characters" }).max(80),
  sensorWidthMm: strictNumber(positive("mm", 100)),
  sensorHeightMm: strictNumber(positive("mm", 100)),
  pixelPitchUm: strictNumber(positive("micrometres", 50)),
  focalMm: strictNumber(positive("mm", 20_000)),
  teleconverter: strictNumber(positive("factor", 4).default(1)),
  fNumber: strictNumber(positive("f-number", 128)),
  mount: z.enum(MOUNTS, { error: `expected one of ${MOUNTS.join(", ")}` }),
  flipHorizontal: checkbox,
  flipVertical: checkbox,
  notes: z.string().trim().max(2000).optional().default(""),
});
export type KitInput = z.infer<typeof kitInputSchema>;

export type KitDto = Omit<Kit, "ownerId" | "createdAt" | "updatedAt"> & { updatedAt: string };

function toDto(k: Kit): KitDto {
  const { ownerId: _o, createdAt: _c, updatedAt, ...rest } = k;
  return { ...rest, updatedAt: updatedAt.toISOString() };
}

export async function listKits(db: DbOrTx, actor: Actor | null): Promise<KitDto[]> {
  return (await listOwnRows(db, actor, kits)).map(toDto);
}

export async function findKit(db: DbOrTx, actor: Actor | null, id: string): Promise<KitDto> {
  return toDto(await findOwnRow(db, actor, kits, id, "That kit"));
}

export async function createKit(db: DbOrTx, actor: Actor | null, input: KitInput): Promise<KitDto> {
  const a = requirePermission(actor, "studio:use");
  const [row] = await db.insert(kits).values({ ...input, ownerId: a.userId }).returning();
  return toDto(row);
}

export async function updateKit(db: DbOrTx, actor: Actor | null, id: string, input: KitInput): Promise<KitDto> {
  const a = requirePermission(actor, "studio:use");
  await findKit(db, a, id);
  const [row] = await db
    .update(kits)
    .set({ ...input, updatedAt: sql`now()` })
    .where(and(eq(kits.id, id), eq(kits.ownerId, a.userId)))
    .returning();
  return toDto(row);
}

export async function deleteKit(db: DbOrTx, actor: Actor | null, id: string): Promise<void> {
  const a = requirePermission(actor, "studio:use");
  await findKit(db, a, id);
  await db.delete(kits).where(and(eq(kits.id, id), eq(kits.ownerId, a.userId)));
}
