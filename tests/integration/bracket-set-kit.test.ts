// A set's kit can be chosen or changed after the set was made, only by its
// owner, only among the owner's own kits, and only while the set is open.
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { bracketSets, kits } from "@/db/schema";
import { updateBracketSet, updateBracketSetSchema } from "@/lib/bracket-sets";
import { requireTestDatabase } from "../support/env";
import { createMember, createSetFor } from "./bracket-upload-helpers";

requireTestDatabase();
const db = getDb();
afterAll(async () => closeDb());

async function kitOf(ownerId: string, name: string): Promise<string> {
  const [k] = await db
    .insert(kits)
    .values({ ownerId, name, camera: "Mono camera", sensorWidthMm: 10, sensorHeightMm: 8, pixelPitchUm: 5, focalMm: 600, fNumber: 7, mount: "equatorial" })
    .returning({ id: kits.id });
  return k.id;
}

describe("a bracket set's kit", () => {
  it("is set, changed and removed by the owner, from their own kits only", async () => {
    const owner = await createMember(db, "Kit Owner");
    const other = await createMember(db, "Other Member");
    const setId = await createSetFor(db, owner, "Set without a kit");
    const mine = await kitOf(owner.userId, "My refractor");
    const theirs = await kitOf(other.userId, "Their lens");

    expect((await updateBracketSet(db, owner, setId, { kitId: mine })).kitId).toBe(mine);
    await expect(updateBracketSet(db, owner, setId, { kitId: theirs })).rejects.toMatchObject({ code: "invalid_input", message: "That kit was not found among yours." });
    await expect(updateBracketSet(db, other, setId, { kitId: theirs })).rejects.toMatchObject({ code: "not_found" });
    expect((await updateBracketSet(db, owner, setId, { kitId: null })).kitId).toBeNull();

    await db.update(bracketSets).set({ state: "awaiting-review" }).where(eq(bracketSets.id, setId));
    await expect(updateBracketSet(db, owner, setId, { kitId: mine })).rejects.toMatchObject({ code: "conflict" });
  });

  it("is changed on its own, not together with the clock", () => {
    const r = updateBracketSetSchema.safeParse({ kitId: "00000000-0000-4000-8000-000000000000", clockOffsetS: 3 });
    expect(r.success).toBe(false);
    expect(updateBracketSetSchema.safeParse({ kitId: "" }).data).toEqual({ kitId: null });
  });
});
