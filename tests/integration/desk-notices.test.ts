// What the desks tell people, against the running app, the database, Redis
// and the SMTP fake: the photographer is mailed when their plate is
// published, withdrawn and restored, and the plate's tiles stop and answer
// again at once; a curator's re-run mails the curator, not the photographer;
// an admin cannot revoke their own admin role (service and route); an invited
// person chooses a password from the mail and signs in; a disabled person
// cannot sign in and loses their session; the eclipse catalogue is saved in
// one go or not at all.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { findRolesOfUser } from "@/db/queries/roles";
import { bracketSets, eclipses, outboxMessages, plates, users } from "@/db/schema";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import type { Actor } from "@/lib/auth/actor";
import { editEclipseCatalogue } from "@/lib/eclipses/eclipses";
import { invitePerson, setPersonDisabled } from "@/lib/people/accounts";
import { changeRole } from "@/lib/people/people";
import { createDraftPlate, updatePlate } from "@/lib/plates/desk";
import { closeWebJpegWriter } from "@/lib/plates/web-jpeg";
import { closeProducerRedis } from "@/lib/queue/connection";
import { closeQueues } from "@/lib/queue/enqueue";
import { notifyReductionOutcome } from "@/lib/reductions/run";
import { APP, requireTestDatabase } from "../support/env";
import { Client } from "../support/http";
import { firstLink, waitForMail } from "../support/mailbox";
import { createMember, createSetFor } from "./bracket-upload-helpers";
import { makeFinishedReduction } from "./plate-fixtures";

requireTestDatabase();
const db = getDb();
const tag = Date.now().toString(36);
const demoCurator = DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!;
const demoAdmin = DEMO_PEOPLE.find((p) => p.roles.includes("admin"))!;

async function actorOf(email: string): Promise<Actor> {
  const [u] = await db.select().from(users).where(eq(users.email, email));
  return { userId: u.id, email: u.email, name: u.name, roles: await findRolesOfUser(db, u.id) };
}

afterAll(async () => {
  await closeWebJpegWriter();
  await closeQueues();
  await closeProducerRedis();
  await closeDb();
});

describe("the photographer hears of their plate, and its images follow its state at once", () => {
  let owner: Actor;
  let curator: Actor;
  let plateId = "";
  let reductionId = "";
  const title = `Prominences over Cadiz ${tag}`;
  const curatorClient = new Client();
  const visitor = new Client();
  const tile = () => visitor.request(`/iiif/reductions/${reductionId}/natural-iiif/info.json`);

  beforeAll(async () => {
    owner = await createMember(db, `Ottilie Marchbank ${tag}`);
    curator = await actorOf(demoCurator.email);
    const setId = await createSetFor(db, owner, `Cadiz prominences ${tag}`);
    reductionId = await makeFinishedReduction(db, setId, 60);
    await db.update(bracketSets).set({ state: "approved" }).where(eq(bracketSets.id, setId));
    ({ id: plateId } = await createDraftPlate(db, curator, { reductionId, renditions: ["natural"] }));
    await updatePlate(db, curator, plateId, {
      title,
      caption: "Prominences on the western limb at second contact; synthetic test data.",
      description: "",
      altText: "A black disk with small pink flames on its right edge.",
      acquiredBy: owner.name,
      processedBy: "Crownlight pipeline 0.9.0-test",
      licence: "CC-BY-4.0",
      slug: `prominences-${tag}`,
    });
    await curatorClient.signIn(demoCurator.email, DEMO_PASSWORD);
  }, 60_000);

  it("publishes: the photographer is mailed with the plate's link, and the tiles are public", async () => {
    expect((await tile()).status).toBe(404);
    const res = await curatorClient.json(`/api/review/plates/${plateId}/publish`, {});
    expect(res.status).toBe(200);
    const mail = await waitForMail(owner.email, (m) => m.subject === `Published: ${title}`);
    expect(mail.text).toContain(`is now in the public gallery as the plate "${title}"`);
    expect(firstLink(mail.text)).toBe(`${APP}/plates/prominences-${tag}`);
    expect((await tile()).status).toBe(200);
  });

  it("withdraws for the time being: mailed with the reason, and the tiles stop at once", async () => {
    // The tile above was answered as public a moment ago; the withdrawal must not wait for that answer to age.
    const res = await curatorClient.json(`/api/review/plates/${plateId}/withdraw`, { reason: `Checking the site with the photographer ${tag}`, kind: "temporary" });
    expect(res.status).toBe(200);
    expect((await tile()).status).toBe(404);
    const mail = await waitForMail(owner.email, (m) => m.subject === `Withdrawn for the time being: ${title}`);
    expect(mail.text).toContain(`Reason: Checking the site with the photographer ${tag}`);
  });

  it("restores: mailed, and the tiles answer again at once", async () => {
    const res = await curatorClient.json(`/api/review/plates/${plateId}/restore`, {});
    expect(res.status).toBe(200);
    expect((await tile()).status).toBe(200);
    const mail = await waitForMail(owner.email, (m) => m.subject === `Back in the gallery: ${title}`);
    expect(mail.text).toContain(`The plate "${title}" is back in the public gallery.`);
    const rows = await db.select({ subject: outboxMessages.subject }).from(outboxMessages).where(eq(outboxMessages.to, owner.email));
    expect(rows.map((r) => r.subject).sort()).toEqual([`Back in the gallery: ${title}`, `Published: ${title}`, `Withdrawn for the time being: ${title}`]);
    const [p] = await db.select({ state: plates.state }).from(plates).where(eq(plates.id, plateId));
    expect(p.state).toBe("published");
  });
});

describe("who hears of a finished reduction", () => {
  it("mails the curator who started a re-run, with the review desk's link, and not the photographer", async () => {
    const owner = await createMember(db, `Benedek Aldous ${tag}`);
    const curator = await createMember(db, `Ysolde Pardoe ${tag}`, ["curator"]);
    const setId = await createSetFor(db, owner, `Sfax deck ${tag}`);
    const byCurator = await makeFinishedReduction(db, setId, 30, curator.userId);
    const byOwner = await makeFinishedReduction(db, setId, 31, owner.userId);
    await notifyReductionOutcome(db, byCurator);
    await notifyReductionOutcome(db, byOwner);
    const toCurator = await waitForMail(curator.email, (m) => m.subject === `Re-reduction finished: Sfax deck ${tag}`);
    expect(firstLink(toCurator.text)).toBe(`${APP}/review/sets/${setId}#reductions-h`);
    const toOwner = await waitForMail(owner.email, (m) => m.subject === `Reduction finished: Sfax deck ${tag}`);
    expect(firstLink(toOwner.text)).toBe(`${APP}/studio/reductions/${byOwner}`);
    // Exactly one message each: the curator's trial is not the photographer's news.
    const [curatorRun] = await db.select({ to: outboxMessages.to }).from(outboxMessages).where(eq(outboxMessages.id, `reduction-outcome-${byCurator}`));
    expect(curatorRun.to).toBe(curator.email);
    const ownerMails = await db.select({ subject: outboxMessages.subject }).from(outboxMessages).where(eq(outboxMessages.to, owner.email));
    expect(ownerMails.map((m) => m.subject)).toEqual([`Reduction finished: Sfax deck ${tag}`]);
  });
});

describe("admins and their own accounts", () => {
  it("refuses an admin who revokes their own admin role, in the service and through the route", async () => {
    const admin = await createMember(db, `Hollis Fenwright ${tag}`, ["member", "admin"]);
    await expect(changeRole(db, admin, admin.userId, { role: "admin", grant: false })).rejects.toMatchObject({ code: "conflict", message: expect.stringMatching(/cannot revoke your own administrator role/) });
    expect(await findRolesOfUser(db, admin.userId)).toContain("admin");
    // Another admin may.
    const other = await createMember(db, `Juno Castellane ${tag}`, ["member", "admin"]);
    expect(await changeRole(db, other, admin.userId, { role: "admin", grant: false })).toEqual(["member"]);

    const c = new Client();
    await c.signIn(demoAdmin.email, DEMO_PASSWORD);
    const me = await actorOf(demoAdmin.email);
    const res = await c.json(`/api/admin/people/${me.userId}/roles`, { role: "admin", grant: false });
    expect(res.status).toBe(409);
    expect(JSON.stringify(res.body)).toMatch(/cannot revoke your own administrator role/);
    expect(await findRolesOfUser(db, me.userId)).toContain("admin");
  });

  it("refuses an admin who disables themselves", async () => {
    const admin = await createMember(db, `Tamsin Orrell ${tag}`, ["member", "admin"]);
    await expect(setPersonDisabled(db, admin, admin.userId, { disabled: true })).rejects.toMatchObject({ code: "conflict" });
  });
});

describe("invitations and disabled accounts", () => {
  const email = `invited.${tag}@people-test.example`;

  it("invites by e-mail: the person chooses a password from the link and signs in with the roles given", async () => {
    const admin = await actorOf(demoAdmin.email);
    const asker = new Client();
    const { roles } = await invitePerson(db, admin, { name: `Wilhelmina Stroud ${tag}`, email: email.toUpperCase(), roles: ["editor"] }, async (to) => {
      const res = await asker.json("/api/auth/request-password-reset", { email: to, redirectTo: "/reset-password?invited=1" });
      expect(res.status).toBe(200);
    });
    expect(roles).toEqual(["member", "editor"]);
    const mail = await waitForMail(email, (m) => m.subject.startsWith("You are invited to"));
    expect(mail.text).toContain(`${admin.name} has invited you`);
    expect(mail.text).toContain("as editor");
    expect(mail.text).toContain("The link works for 7 days");
    // An address that has an account cannot be invited again.
    await expect(invitePerson(db, admin, { name: "Again", email, roles: [] }, async () => {})).rejects.toMatchObject({ code: "conflict", fields: [expect.objectContaining({ field: "email" })] });

    const person = new Client();
    const link = new URL(firstLink(mail.text));
    const hop = await person.request(link.pathname + link.search);
    const landing = new URL(hop.headers.get("location") ?? "", APP);
    expect(landing.pathname).toBe("/reset-password");
    expect(landing.searchParams.get("invited")).toBe("1");
    const reset = await person.json("/api/auth/reset-password", { newPassword: "first-light-2027", token: landing.searchParams.get("token") });
    expect(reset.status).toBe(200);
    await person.signIn(email, "first-light-2027");
    const me = await person.json("/api/me");
    expect(me.status).toBe(200);
    expect(JSON.stringify(me.body)).toContain("editor");
  });

  it("disables: the session ends, sign-in is refused with our code; enabled again, sign-in works", async () => {
    const admin = await actorOf(demoAdmin.email);
    const person = new Client();
    await person.signIn(email, "first-light-2027");
    const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
    await setPersonDisabled(db, admin, u.id, { disabled: true });
    expect((await person.json("/api/me")).status).toBe(401);
    const refused = await new Client().json("/api/auth/sign-in/email", { email, password: "first-light-2027" });
    expect(refused.status).toBe(403);
    expect(JSON.stringify(refused.body)).toContain("ACCOUNT_DISABLED");
    await setPersonDisabled(db, admin, u.id, { disabled: false });
    await new Client().signIn(email, "first-light-2027");
  });
});

describe("the eclipse catalogue's one save", () => {
  it("saves every changed row at once, or none when one is refused", async () => {
    const admin = await actorOf(demoAdmin.email);
    const rows = await db.select({ id: eclipses.id, name: eclipses.name, featured: eclipses.featured }).from(eclipses).limit(2);
    const [a, b] = rows;
    const form = (nameA: string, nameB: string) => ({ ids: `${a.id},${b.id}`, [`name:${a.id}`]: nameA, [`name:${b.id}`]: nameB, [`featured:${a.id}`]: a.featured ? "on" : undefined, [`featured:${b.id}`]: "on" });
    await expect(editEclipseCatalogue(db, admin, form(`Kestrel ${tag}`, "x".repeat(121)))).rejects.toMatchObject({ code: "invalid_input", fields: [expect.objectContaining({ field: `name:${b.id}` })] });
    const [still] = await db.select({ name: eclipses.name }).from(eclipses).where(eq(eclipses.id, a.id));
    expect(still.name).toBe(a.name);
    const changed = await editEclipseCatalogue(db, admin, form(`Kestrel ${tag}`, `Ridge ${tag}`));
    expect(changed.sort()).toEqual([a.id, b.id].sort());
    const after = await db.select({ id: eclipses.id, name: eclipses.name, featured: eclipses.featured }).from(eclipses).where(and(eq(eclipses.id, b.id)));
    expect(after[0]).toMatchObject({ name: `Ridge ${tag}`, featured: true });
    expect(await editEclipseCatalogue(db, admin, form(`Kestrel ${tag}`, `Ridge ${tag}`))).toEqual([]);
    // Leave the catalogue as it was for other tests.
    await db.update(eclipses).set({ name: a.name, featured: a.featured }).where(eq(eclipses.id, a.id));
    await db.update(eclipses).set({ name: b.name, featured: b.featured }).where(eq(eclipses.id, b.id));
  });
});
