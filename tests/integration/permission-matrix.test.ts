// Calls every route handler and every role-gated page as a visitor, a member,
// a curator, an editor and an admin, and checks the status codes. A route file
// that is not in the matrix fails the test, so new routes must be added here.
import fs from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import sharp from "sharp";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db/client";
import { compositeInputs, composites, reductions, sites } from "@/db/schema";
import { encodeFits } from "@/lib/media";
import { createPlateFromComposite, createPlateFromReduction } from "@/lib/plates/publish";
import { bucketName, buildCompositePrefix, putObjectBytes, buildReductionPrefix } from "@/lib/storage";
import { DEMO_PASSWORD, DEMO_PEOPLE } from "@/db/seed/people";
import { Client } from "../support/http";

type Who = "visitor" | "member" | "curator" | "editor" | "admin";
const WHO: Who[] = ["visitor", "member", "curator", "editor", "admin"];

const EMAIL: Record<Exclude<Who, "visitor">, string> = {
  member: DEMO_PEOPLE.find((p) => p.roles.join() === "member")!.email,
  curator: DEMO_PEOPLE.find((p) => p.roles.includes("curator"))!.email,
  editor: DEMO_PEOPLE.find((p) => p.roles.includes("editor"))!.email,
  admin: DEMO_PEOPLE.find((p) => p.roles.includes("admin"))!.email,
};

/** Made at run time: the member's own bracket set, an open upload in it and a frame. */
interface Ids {
  memberId: string;
  siteId: string;
  setId: string;
  uploadId: string;
  frameId: string;
  /** A finished reduction of another of the member's sets, with a report.json and a preview stored; no plate shows it. */
  reductionId: string;
  /** A finished reduction of a third set of the member's, shown by a published plate. */
  publishedReductionId: string;
  /** A finished composite the member made of their two reductions; no plate shows it. */
  compositeId: string;
  /** Another such composite, shown by a published plate. */
  publishedCompositeId: string;
}

interface Case {
  /** The route file's path template, e.g. /api/admin/people/[id]/roles */
  route: string;
  method: "GET" | "POST" | "PATCH" | "DELETE";
  /** A concrete path to call; ids are filled in at run time. */
  path: (ids: Ids) => string;
  body?: unknown | ((ids: Ids) => unknown);
  expect: Record<Who, number>;
  /** Tells apart several cases of one route in the test names. */
  label?: string;
}

const everyone = (status: number): Record<Who, number> => ({ visitor: status, member: status, curator: status, editor: status, admin: status });
const signedIn = { visitor: 401, member: 200, curator: 200, editor: 200, admin: 200 };
const adminOnly = { visitor: 401, member: 403, curator: 403, editor: 403, admin: 200 };
// Someone else's bracket set: the curator sees it but may not change it; other
// members are told it does not exist (404, not 403, so ids do not leak).
const ownSetRead = { visitor: 401, member: 200, curator: 200, editor: 404, admin: 404 };
const ownSetWrite = (ok: number) => ({ visitor: 401, member: ok, curator: 403, editor: 404, admin: 404 });
const SET = "/api/bracket-sets";
const curatorOnly = (ok: number) => ({ visitor: 401, member: 403, curator: ok, editor: 403, admin: 403 });
const NO_ID = "00000000-0000-4000-8000-000000000000";
const editorsOnly = (ok: number) => ({ visitor: 401, member: 403, curator: 403, editor: ok, admin: ok });
const ED = "/api/editions";
const PLATE_TEXTS = {
  title: "Matrix plate",
  caption: "A caption.",
  description: "",
  altText: "An image used by the permission matrix.",
  acquiredBy: "Matrix Person",
  processedBy: "Crownlight pipeline",
  licence: "CC-BY-4.0",
  slug: "matrix-plate",
};

const API_CASES: Case[] = [
  { route: "/api/health", method: "GET", path: () => "/api/health", expect: everyone(200) },
  // better-auth's own endpoints are public by design; get-session answers null to a visitor.
  { route: "/api/auth/[...all]", method: "GET", path: () => "/api/auth/get-session", expect: everyone(200) },
  { route: "/api/me", method: "GET", path: () => "/api/me", expect: signedIn },
  // The planner is public; its downloads too.
  { route: "/api/planner/calendar", method: "GET", path: () => "/api/planner/calendar?eclipse=2027-08-02&lat=25.69&lon=32.64", expect: everyone(200) },
  { route: "/api/planner/ladder", method: "GET", path: () => "/api/planner/ladder?eclipse=2027-08-02&lat=25.69&lon=32.64", expect: everyone(200) },
  { route: "/api/admin/people", method: "GET", path: () => "/api/admin/people", expect: adminOnly },
  {
    route: "/api/admin/people/[id]/roles",
    method: "POST",
    path: ({ memberId }) => `/api/admin/people/${memberId}/roles`,
    // Granting a role already held changes nothing, so the matrix leaves no trace.
    body: { role: "member", grant: true },
    expect: adminOnly,
  },
  { route: SET, method: "GET", path: () => SET, expect: signedIn },
  {
    route: SET,
    method: "POST",
    path: () => SET,
    // The site is the member's own: everyone else is told it is not among theirs.
    body: ({ siteId }: Ids) => ({ name: "Matrix bracket", eclipseId: "2027-08-02", siteId }),
    expect: { visitor: 401, member: 201, curator: 400, editor: 400, admin: 400 },
  },
  { route: `${SET}/[id]`, method: "GET", path: ({ setId }) => `${SET}/${setId}`, expect: ownSetRead },
  { route: `${SET}/[id]`, method: "PATCH", path: ({ setId }) => `${SET}/${setId}`, body: { clockOffsetS: 0 }, expect: ownSetWrite(200) },
  { route: `${SET}/[id]/uploads`, method: "POST", path: ({ setId }) => `${SET}/${setId}/uploads`, body: { fileName: "matrix.tif", sizeBytes: 10 }, expect: ownSetWrite(201) },
  { route: `${SET}/[id]/uploads/[uploadId]/parts`, method: "GET", path: ({ setId, uploadId }) => `${SET}/${setId}/uploads/${uploadId}/parts`, expect: ownSetWrite(200) },
  {
    route: `${SET}/[id]/uploads/[uploadId]/parts`,
    method: "POST",
    path: ({ setId, uploadId }) => `${SET}/${setId}/uploads/${uploadId}/parts`,
    body: { partNumbers: [1] },
    expect: ownSetWrite(200),
  },
  // Nothing was sent, so the owner is told which part is missing (409).
  { route: `${SET}/[id]/uploads/[uploadId]/complete`, method: "POST", path: ({ setId, uploadId }) => `${SET}/${setId}/uploads/${uploadId}/complete`, body: {}, expect: ownSetWrite(409) },
  { route: `${SET}/[id]/frames/[frameId]`, method: "PATCH", path: ({ setId, frameId }) => `${SET}/${setId}/frames/${frameId}`, body: { included: true }, expect: ownSetWrite(200) },
  // Removal is checked on an id that names no frame, so the matrix's frame stays: the owner is told it is not found.
  { route: `${SET}/[id]/frames/[frameId]`, method: "DELETE", path: ({ setId }) => `${SET}/${setId}/frames/${NO_ID}`, expect: ownSetWrite(404) },
  // A CSV naming no frame of the set changes nothing: the owner is told which line (400).
  {
    route: `${SET}/[id]/frame-times`,
    method: "POST",
    path: ({ setId }) => `${SET}/${setId}/frame-times`,
    body: { method: "csv", fileName: "times.csv", text: "file,capture_time\nno-such-frame.fits,2027-08-02T10:04:40Z\n" },
    expect: ownSetWrite(400),
  },
  // The frame's files: the owner and curators; everyone else is told they do not exist.
  { route: `${SET}/[id]/frames/[frameId]/thumbnail`, method: "GET", path: ({ setId, frameId }) => `${SET}/${setId}/frames/${frameId}/thumbnail`, expect: ownSetRead },
  { route: `${SET}/[id]/frames/[frameId]/original`, method: "GET", path: ({ setId, frameId }) => `${SET}/${setId}/frames/${frameId}/original`, expect: ownSetRead },
  // Grouping by a 20 s gap leaves the matrix's set of one frame as it is.
  { route: `${SET}/[id]/groups`, method: "POST", path: ({ setId }) => `${SET}/${setId}/groups`, body: { action: "auto", gapS: 20 }, expect: ownSetWrite(200) },
  // No reduction of the matrix's set has finished: the owner is told so (409).
  { route: `${SET}/[id]/submit`, method: "POST", path: ({ setId }) => `${SET}/${setId}/submit`, body: {}, expect: ownSetWrite(409) },
  { route: `${SET}/[id]/reductions`, method: "GET", path: ({ setId }) => `${SET}/${setId}/reductions`, expect: ownSetRead },
  // The matrix's set has no frames: the owner and a curator (who may re-reduce) are told so (400).
  {
    route: `${SET}/[id]/reductions`,
    method: "POST",
    path: ({ setId }) => `${SET}/${setId}/reductions`,
    body: { registration: "corona" },
    expect: { visitor: 401, member: 400, curator: 400, editor: 404, admin: 404 },
  },
  // The public gallery and its IIIF documents: open to all; a plate that is not published is not found.
  { route: "/api/plates", method: "GET", path: () => "/api/plates?eclipse=2027-08-02", expect: everyone(200) },
  { route: "/iiif/plates/[slug]/manifest.json", method: "GET", path: () => "/iiif/plates/no-such-plate/manifest.json", expect: everyone(404) },
  { route: "/iiif/plates/[slug]/v/[version]/manifest.json", method: "GET", path: () => "/iiif/plates/no-such-plate/v/1/manifest.json", expect: everyone(404) },
  { route: "/iiif/eclipses/[id]/collection.json", method: "GET", path: () => "/iiif/eclipses/2027-08-02/collection.json", expect: everyone(200) },
  // Files of a reduction no published plate shows and nobody here may see: not found, even for a visitor.
  {
    route: "/iiif/reductions/[id]/[...path]",
    method: "GET",
    label: "no such reduction",
    path: () => "/iiif/reductions/00000000-0000-4000-8000-000000000000/natural-iiif/info.json",
    expect: everyone(404),
  },
  // The member's unpublished reduction: its owner and curators only; everyone else is told it does not exist.
  { route: "/iiif/reductions/[id]/[...path]", method: "GET", label: "unpublished preview", path: ({ reductionId }) => `/iiif/reductions/${reductionId}/preview.jpg`, expect: { visitor: 404, member: 200, curator: 200, editor: 404, admin: 404 } },
  { route: "/iiif/reductions/[id]/[...path]", method: "GET", label: "unpublished master", path: ({ reductionId }) => `/iiif/reductions/${reductionId}/master.fits`, expect: { visitor: 404, member: 200, curator: 200, editor: 404, admin: 404 } },
  // A reduction a published plate shows: its preview and (CC BY allows downloads) its master, for everyone.
  { route: "/iiif/reductions/[id]/[...path]", method: "GET", label: "published preview", path: ({ publishedReductionId }) => `/iiif/reductions/${publishedReductionId}/preview.jpg`, expect: everyone(200) },
  { route: "/iiif/reductions/[id]/[...path]", method: "GET", label: "published master", path: ({ publishedReductionId }) => `/iiif/reductions/${publishedReductionId}/master.fits`, expect: everyone(200) },
  // Never report.json on this route, published or not: it holds the exact site.
  { route: "/iiif/reductions/[id]/[...path]", method: "GET", label: "published report", path: ({ publishedReductionId }) => `/iiif/reductions/${publishedReductionId}/report.json`, expect: everyone(404) },
  // A composite's files, on the same terms: the composer (the member here) and curators while no published plate shows it.
  {
    route: "/iiif/composites/[id]/[...path]",
    method: "GET",
    label: "unpublished contribution map",
    path: ({ compositeId }) => `/iiif/composites/${compositeId}/contribution.jpg`,
    expect: { visitor: 404, member: 200, curator: 200, editor: 404, admin: 404 },
  },
  { route: "/iiif/composites/[id]/[...path]", method: "GET", label: "published preview", path: ({ publishedCompositeId }) => `/iiif/composites/${publishedCompositeId}/preview.jpg`, expect: everyone(200) },
  { route: "/iiif/composites/[id]/[...path]", method: "GET", label: "published contribution map", path: ({ publishedCompositeId }) => `/iiif/composites/${publishedCompositeId}/contribution.jpg`, expect: everyone(200) },
  { route: "/iiif/composites/[id]/[...path]", method: "GET", label: "published report", path: ({ publishedCompositeId }) => `/iiif/composites/${publishedCompositeId}/report.json`, expect: everyone(404) },
  { route: "/iiif/composites/[id]/[...path]", method: "GET", label: "no such composite", path: () => `/iiif/composites/${NO_ID}/preview.jpg`, expect: everyone(404) },
  // An id that names no reduction: not found for everyone signed in.
  {
    route: "/api/reductions/[id]",
    method: "GET",
    path: () => "/api/reductions/00000000-0000-4000-8000-000000000000",
    expect: { visitor: 401, member: 404, curator: 404, editor: 404, admin: 404 },
  },
  // The member's finished reduction: its owner and curators read its files; other members are told it does not exist.
  { route: "/api/reductions/[id]/files/[...path]", method: "GET", path: ({ reductionId }) => `/api/reductions/${reductionId}/files/report.json`, expect: ownSetRead },
  // Composites: every member may list and compose (their own reductions; curators anyone's). A chosen reduction that is
  // missing, or another member's, is not found; so is a composite that does not exist (tests/integration/composites.test.ts
  // covers composites that do).
  { route: "/api/composites", method: "GET", path: () => "/api/composites", expect: { visitor: 401, member: 200, curator: 200, editor: 200, admin: 200 } },
  {
    route: "/api/composites",
    method: "POST",
    path: () => "/api/composites",
    body: ({ reductionId }: Ids) => ({ title: "Matrix composite", reductionIds: [reductionId, "00000000-0000-4000-8000-000000000000"] }),
    expect: { visitor: 401, member: 404, curator: 404, editor: 404, admin: 404 },
  },
  { route: "/api/composites/[id]", method: "GET", path: () => "/api/composites/00000000-0000-4000-8000-000000000000", expect: { visitor: 401, member: 404, curator: 404, editor: 404, admin: 404 } },
  {
    route: "/api/composites/[id]/files/[...path]",
    method: "GET",
    path: () => "/api/composites/00000000-0000-4000-8000-000000000000/files/report.json",
    expect: { visitor: 401, member: 404, curator: 404, editor: 404, admin: 404 },
  },
  // The review desk (curators). The matrix's set is still gathering: a curator's decision is refused by the state machine (409).
  {
    route: "/api/review/sets/[id]/decisions",
    method: "POST",
    path: ({ setId }) => `/api/review/sets/${setId}/decisions`,
    body: { action: "approve" },
    expect: { visitor: 401, member: 403, curator: 409, editor: 403, admin: 403 },
  },
  { route: "/api/review/sets/[id]/notes", method: "GET", path: ({ setId }) => `/api/review/sets/${setId}/notes`, expect: { visitor: 401, member: 403, curator: 200, editor: 403, admin: 403 } },
  // An empty note is refused (400), so the matrix leaves no trace.
  {
    route: "/api/review/sets/[id]/notes",
    method: "POST",
    path: ({ setId }) => `/api/review/sets/${setId}/notes`,
    body: { body: "" },
    expect: { visitor: 401, member: 403, curator: 400, editor: 403, admin: 403 },
  },
  // A set still gathering is not on the desk (404 for the curator).
  {
    route: "/api/review/assignments",
    method: "POST",
    path: () => "/api/review/assignments",
    body: ({ setId }: Ids) => ({ setIds: [setId] }),
    expect: { visitor: 401, member: 403, curator: 404, editor: 403, admin: 403 },
  },
  { route: "/api/review/queue.csv", method: "GET", path: () => "/api/review/queue.csv?state=all", expect: { visitor: 401, member: 403, curator: 200, editor: 403, admin: 403 } },
  // The plate desk: curators only. A plate or reduction id that names nothing is not found for them.
  { route: "/api/review/plates", method: "GET", path: () => "/api/review/plates", expect: curatorOnly(200) },
  { route: "/api/review/plates", method: "POST", path: () => "/api/review/plates", body: { reductionId: NO_ID, renditions: ["natural"] }, expect: curatorOnly(404) },
  { route: "/api/review/plates/[id]", method: "GET", path: () => `/api/review/plates/${NO_ID}`, expect: curatorOnly(404) },
  { route: "/api/review/plates/[id]", method: "PATCH", path: () => `/api/review/plates/${NO_ID}`, body: PLATE_TEXTS, expect: curatorOnly(404) },
  { route: "/api/review/plates/[id]/publish", method: "POST", path: () => `/api/review/plates/${NO_ID}/publish`, expect: curatorOnly(404) },
  { route: "/api/review/plates/[id]/withdraw", method: "POST", path: () => `/api/review/plates/${NO_ID}/withdraw`, body: { reason: "Matrix check", kind: "temporary" }, expect: curatorOnly(404) },
  { route: "/api/review/plates/[id]/restore", method: "POST", path: () => `/api/review/plates/${NO_ID}/restore`, expect: curatorOnly(404) },
  {
    route: "/api/review/plates/[id]/versions",
    method: "POST",
    path: () => `/api/review/plates/${NO_ID}/versions`,
    body: { reductionId: NO_ID, renditions: ["natural"], changeNote: "Matrix check" },
    expect: curatorOnly(404),
  },
  {
    route: "/api/review/plates/[id]/reports/[reportId]/answer",
    method: "POST",
    path: () => `/api/review/plates/${NO_ID}/reports/${NO_ID}/answer`,
    body: { answer: "Matrix check", close: true },
    expect: curatorOnly(404),
  },
  // Public: reports and the web JPEG of a plate that is not published are not found.
  {
    route: "/api/plates/[slug]/reports",
    method: "POST",
    path: () => "/api/plates/no-such-plate/reports",
    body: { kind: "error", message: "Matrix check of the report form", email: "matrix@visitors.example" },
    expect: everyone(404),
  },
  { route: "/api/plates/[slug]/web-jpeg", method: "GET", path: () => "/api/plates/no-such-plate/web-jpeg", expect: everyone(404) },
  // Editions: editors and admins. An untitled edition is refused (400) and ids that name nothing are not found, so the matrix leaves no trace.
  { route: ED, method: "GET", path: () => ED, expect: editorsOnly(200) },
  { route: ED, method: "POST", path: () => ED, body: { title: "", kind: "newsletter" }, expect: editorsOnly(400) },
  { route: `${ED}/[id]`, method: "GET", path: () => `${ED}/${NO_ID}`, expect: editorsOnly(404) },
  { route: `${ED}/[id]`, method: "PATCH", path: () => `${ED}/${NO_ID}`, body: { embargoDate: null }, expect: editorsOnly(404) },
  { route: `${ED}/[id]`, method: "DELETE", path: () => `${ED}/${NO_ID}`, expect: editorsOnly(404) },
  { route: `${ED}/[id]/name`, method: "PATCH", path: () => `${ED}/${NO_ID}/name`, body: { title: "Matrix check", kind: "journal" }, expect: editorsOnly(404) },
  { route: `${ED}/[id]/items`, method: "POST", path: () => `${ED}/${NO_ID}/items`, body: { plateId: NO_ID }, expect: editorsOnly(404) },
  { route: `${ED}/[id]/items/[itemId]`, method: "PATCH", path: () => `${ED}/${NO_ID}/items/${NO_ID}`, body: { slot: "web", rendition: "natural" }, expect: editorsOnly(404) },
  { route: `${ED}/[id]/items/[itemId]`, method: "DELETE", path: () => `${ED}/${NO_ID}/items/${NO_ID}`, expect: editorsOnly(404) },
  { route: `${ED}/[id]/items/[itemId]/move`, method: "POST", path: () => `${ED}/${NO_ID}/items/${NO_ID}/move`, body: { direction: "up" }, expect: editorsOnly(404) },
  { route: `${ED}/[id]/exports`, method: "GET", path: () => `${ED}/${NO_ID}/exports`, expect: editorsOnly(404) },
  { route: `${ED}/[id]/exports`, method: "POST", path: () => `${ED}/${NO_ID}/exports`, body: {}, expect: editorsOnly(404) },
  { route: `${ED}/[id]/exports/[exportId]`, method: "GET", path: () => `${ED}/${NO_ID}/exports/${NO_ID}`, expect: editorsOnly(404) },
  { route: `${ED}/[id]/exports/[exportId]/download`, method: "GET", path: () => `${ED}/${NO_ID}/exports/${NO_ID}/download`, expect: editorsOnly(404) },
  { route: `${ED}/[id]/reopen`, method: "POST", path: () => `${ED}/${NO_ID}/reopen`, body: {}, expect: editorsOnly(404) },
  { route: `${ED}/[id]/items/[itemId]/newest-version`, method: "POST", path: () => `${ED}/${NO_ID}/items/${NO_ID}/newest-version`, expect: editorsOnly(404) },
  // Last: it aborts the upload the cases above use.
  { route: `${SET}/[id]/uploads/[uploadId]`, method: "DELETE", path: ({ setId, uploadId }) => `${SET}/${setId}/uploads/${uploadId}`, expect: ownSetWrite(200) },
];

const PAGE_CASES: { path: string; expect: Record<Who, number> }[] = [
  { path: "/", expect: everyone(200) },
  { path: "/sign-in", expect: everyone(200) },
  // A visitor is sent to sign in (307); a signed-in person without the role sees 403.
  { path: "/studio", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/review", expect: { visitor: 307, member: 403, curator: 200, editor: 403, admin: 403 } },
  { path: "/review/plates", expect: { visitor: 307, member: 403, curator: 200, editor: 403, admin: 403 } },
  { path: "/editions", expect: { visitor: 307, member: 403, curator: 403, editor: 200, admin: 200 } },
  { path: "/admin/people", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin/settings", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin/eclipses", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/eclipses", expect: everyone(200) },
  { path: "/planner", expect: everyone(200) },
  { path: "/studio/kits", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/composites", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/composites/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 404, curator: 404, editor: 404, admin: 404 } },
  { path: "/studio/kits/new", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/sites", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/sites/new", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/gallery", expect: everyone(200) },
  { path: "/plates/no-such-plate", expect: everyone(404) },
  { path: "/plates/no-such-plate/v/1", expect: everyone(404) },
  { path: "/eclipses/2027-08-02", expect: everyone(200) },
  { path: "/eclipses/1999-01-01", expect: everyone(404) },
  { path: "/studio/sets/new", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  // A set that does not exist, or is someone else's: the same 404.
  { path: "/studio/sets/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 404, curator: 404, editor: 404, admin: 404 } },
  { path: "/studio/sets/not-a-uuid", expect: { visitor: 307, member: 404, curator: 404, editor: 404, admin: 404 } },
];

/** Pages whose path needs the ids made at run time. */
const ID_PAGE_CASES: { route: string; label: string; path: (ids: Ids) => string; expect: Record<Who, number> }[] = [
  // The member's reduction: the owner and curators see it; other members get 404, like a missing one.
  { route: "/studio/reductions/[id]", label: "the member's", path: ({ reductionId }) => `/studio/reductions/${reductionId}`, expect: { visitor: 307, member: 200, curator: 200, editor: 404, admin: 404 } },
  { route: "/editions/[id]", label: "a missing one", path: () => "/editions/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 403, curator: 403, editor: 404, admin: 404 } },
  { route: "/review/plates/[id]", label: "a missing one", path: () => "/review/plates/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 403, curator: 404, editor: 403, admin: 403 } },
  { route: "/studio/reductions/[id]", label: "a missing one", path: () => "/studio/reductions/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 404, curator: 404, editor: 404, admin: 404 } },
  // The review page of one set: curators only; a missing set is 404 for them.
  { route: "/review/sets/[id]", label: "the member's", path: ({ setId }) => `/review/sets/${setId}`, expect: { visitor: 307, member: 403, curator: 200, editor: 403, admin: 403 } },
  { route: "/review/sets/[id]", label: "a missing one", path: () => "/review/sets/00000000-0000-4000-8000-000000000000", expect: { visitor: 307, member: 403, curator: 404, editor: 403, admin: 403 } },
];

function routeTemplates(): string[] {
  const root = path.resolve("app");
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/^route\.(ts|tsx)$/.test(e.name)) {
        const rel = path.relative(root, path.dirname(p)).split(path.sep);
        // Route groups "(name)" and private folders "_name" are not part of the URL.
        out.push("/" + rel.filter((s) => !/^\(.*\)$/.test(s)).join("/"));
      }
    }
  };
  walk(root);
  return out.sort();
}

const clients = {} as Record<Who, Client>;
let memberId = "";
const ids: Ids = { memberId: "", siteId: "", setId: "", uploadId: "", frameId: "", reductionId: "", publishedReductionId: "", compositeId: "", publishedCompositeId: "" };

async function ok<T>(call: Promise<{ status: number; body: unknown }>, status: number): Promise<T> {
  const res = await call;
  if (res.status !== status) throw new Error(`expected ${status}, got ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body as T;
}

/** The member's own bracket set, a frame sent through presigned URLs, and an open upload. */
async function prepareBracketSet(): Promise<void> {
  const db = getDb();
  const [site] = await db.insert(sites).values({ ownerId: memberId, name: "Matrix site", kind: "fixed", latDeg: 36.53, lonDeg: -6.29 }).returning({ id: sites.id });
  ids.siteId = site.id;
  const set = await ok<{ id: string }>(clients.member.json(SET, { name: "Matrix set", eclipseId: "2027-08-02", siteId: site.id }), 201);
  ids.setId = set.id;
  const png = new Uint8Array(await sharp({ create: { width: 8, height: 8, channels: 3, background: "#204060" } }).png().toBuffer());
  const upload = await ok<{ id: string }>(clients.member.json(`${SET}/${set.id}/uploads`, { fileName: "matrix.png", sizeBytes: png.length }), 201);
  const signed = await ok<{ urls: { url: string }[] }>(clients.member.json(`${SET}/${set.id}/uploads/${upload.id}/parts`, { partNumbers: [1] }), 200);
  const put = await fetch(signed.urls[0].url, { method: "PUT", body: png });
  expect(put.status).toBe(200);
  const frame = await ok<{ id: string }>(clients.member.json(`${SET}/${set.id}/uploads/${upload.id}/complete`, {}), 200);
  ids.frameId = frame.id;
  // The thumbnail cases need the worker's ingest to have written it.
  for (let i = 0; i < 200; i++) {
    const read = await ok<{ frames: { id: string; ingestState: string }[] }>(clients.member.json(`${SET}/${set.id}`), 200);
    if (read.frames.find((f) => f.id === frame.id)?.ingestState !== "received") break;
    await new Promise((r) => setTimeout(r, 200));
  }
  const open = await ok<{ id: string }>(clients.member.json(`${SET}/${set.id}/uploads`, { fileName: "open.tif", sizeBytes: 100 }), 201);
  ids.uploadId = open.id;
  // A finished reduction written directly (no set here has frames enough to reduce): its row and its report.
  // It lives in a set of its own, so the cases above see a set with no finished reduction.
  ids.reductionId = await storeFinishedReduction(site.id, "Matrix reduced set");
  // A third set whose reduction a published plate shows.
  ids.publishedReductionId = await storeFinishedReduction(site.id, "Matrix published set");
  await createPlateFromReduction(db, {
    ...PLATE_TEXTS,
    reductionId: ids.publishedReductionId,
    slug: `matrix-published-${ids.publishedReductionId.slice(0, 8)}`,
    title: "Matrix published plate",
    licence: "CC-BY-4.0",
    renditions: ["natural"],
    publish: true,
    createdBy: null,
  });
  // Two composites of the member's two reductions, one of them on a published plate.
  ids.compositeId = await storeFinishedComposite([ids.reductionId, ids.publishedReductionId]);
  ids.publishedCompositeId = await storeFinishedComposite([ids.reductionId, ids.publishedReductionId]);
  await createPlateFromComposite(db, {
    ...PLATE_TEXTS,
    compositeId: ids.publishedCompositeId,
    slug: `matrix-composite-${ids.publishedCompositeId.slice(0, 8)}`,
    title: "Matrix composite plate",
    licence: "CC-BY-4.0",
    renditions: ["natural"],
    publish: true,
    createdBy: null,
  });
}

/** A finished composite written directly, composed by the member: its rows, report, pyramid descriptor, preview and contribution map. */
async function storeFinishedComposite(reductionIds: string[]): Promise<string> {
  const db = getDb();
  const [row] = await db
    .insert(composites)
    .values({ eclipseId: "2027-08-02", composedBy: memberId, title: "Matrix composite", params: { refine: true, filter: "mgn" }, state: "done", progress: 1 })
    .returning({ id: composites.id });
  await db.insert(compositeInputs).values(reductionIds.map((reductionId, position) => ({ compositeId: row.id, position, reductionId })));
  const prefix = buildCompositePrefix(row.id);
  const stored = (key: string) => ({ bucket: bucketName("derived"), key: prefix + key });
  const jpeg = await sharp({ create: { width: 8, height: 8, channels: 3, background: "#204060" } }).jpeg().toBuffer();
  const report = { reportVersion: 1, kind: "composite", grid: { width: 8, height: 8, scaleArcsecPerPx: 10, sunCentre: { x: 4, y: 4 }, sunRadiusPx: 2, solarNorthDeg: 0 }, inputs: [] };
  await putObjectBytes(stored("report.json"), Buffer.from(JSON.stringify(report)), "application/json");
  await putObjectBytes(stored("tiles/natural-iiif/info.json"), Buffer.from(JSON.stringify({ width: 8, height: 8 })), "application/json");
  await putObjectBytes(stored("preview.jpg"), jpeg, "image/jpeg");
  await putObjectBytes(stored("contribution.jpg"), jpeg, "image/jpeg");
  await db.update(composites).set({ outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` }, measurements: report }).where(eq(composites.id, row.id));
  return row.id;
}

/** A finished reduction written directly in a new set of the member's: its row, report, pyramid descriptor, preview and master. */
async function storeFinishedReduction(siteId: string, setName: string): Promise<string> {
  const db = getDb();
  const reduced = await ok<{ id: string }>(clients.member.json(SET, { name: setName, eclipseId: "2027-08-02", siteId }), 201);
  const [red] = await db
    .insert(reductions)
    .values({ bracketSetId: reduced.id, requestedBy: memberId, params: { registration: "sun", filter: "mgn", recoverResponse: false }, state: "done", progress: 1 })
    .returning({ id: reductions.id });
  const prefix = buildReductionPrefix(reduced.id, red.id);
  const report = { reportVersion: 1, pipelineVersion: "matrix", frames: [], overall: {}, timingsMs: {}, outputs: {}, notes: [] };
  const derived = (key: string) => ({ bucket: bucketName("derived"), key: prefix + key });
  await putObjectBytes(derived("report.json"), Buffer.from(JSON.stringify(report)), "application/json");
  await putObjectBytes(derived("tiles/natural-iiif/info.json"), Buffer.from(JSON.stringify({ width: 8, height: 8 })), "application/json");
  await putObjectBytes(derived("preview.jpg"), await sharp({ create: { width: 8, height: 8, channels: 3, background: "#204060" } }).jpeg().toBuffer(), "image/jpeg");
  const master = encodeFits({ width: 4, height: 3, planes: [new Float32Array(12).fill(1)], cards: [{ key: "OBSGEO-X", value: 5_000_000.5, real: true }] });
  await putObjectBytes(derived("master.fits"), Buffer.from(master), "application/fits");
  await db.update(reductions).set({ outputs: { prefix, report: `${prefix}report.json`, tiles: `${prefix}tiles/` } }).where(eq(reductions.id, red.id));
  return red.id;
}

afterAll(closeDb);

beforeAll(async () => {
  clients.visitor = new Client();
  for (const who of WHO.filter((w): w is Exclude<Who, "visitor"> => w !== "visitor")) {
    clients[who] = new Client();
    await clients[who].signIn(EMAIL[who], DEMO_PASSWORD);
  }
  const me = await clients.member.json("/api/me");
  memberId = (me.body as { id: string }).id;
  ids.memberId = memberId;
  await prepareBracketSet();
});

describe("permission matrix", () => {
  it("covers every route handler in app/", () => {
    expect(routeTemplates()).toEqual([...new Set(API_CASES.map((c) => c.route))].sort());
  });

  for (const c of API_CASES) {
    for (const who of WHO) {
      it(`${c.method} ${c.route}${c.label ? ` (${c.label})` : ""} as ${who} answers ${c.expect[who]}`, async () => {
        const body = typeof c.body === "function" ? c.body(ids) : c.body;
        const { status } = await clients[who].json(c.path(ids), body, c.method);
        expect(status).toBe(c.expect[who]);
      });
    }
  }

  for (const c of PAGE_CASES) {
    for (const who of WHO) {
      it(`page ${c.path} as ${who} answers ${c.expect[who]}`, async () => {
        const res = await clients[who].request(c.path);
        expect(res.status).toBe(c.expect[who]);
        if (res.status === 307) expect(res.headers.get("location")).toContain("/sign-in?next=");
      });
    }
  }

  for (const c of ID_PAGE_CASES) {
    for (const who of WHO) {
      it(`page ${c.route} (${c.label}) as ${who} answers ${c.expect[who]}`, async () => {
        const res = await clients[who].request(c.path(ids));
        expect(res.status).toBe(c.expect[who]);
        if (res.status === 307) expect(res.headers.get("location")).toContain("/sign-in?next=");
      });
    }
  }

  it("lets nobody plan from another person's saved site", async () => {
    const someone = "/api/planner/calendar?eclipse=2027-08-02&site=" + "00000000-0000-4000-8000-000000000000";
    expect((await clients.visitor.json(someone)).status).toBe(401);
    expect((await clients.member.json(someone)).status).toBe(404);
  });

  it("keeps another member's bracket set hidden: the same 404 as a set that does not exist", async () => {
    const other = clients.editor;
    const missing = "00000000-0000-4000-8000-000000000000";
    const nowhere = await other.json(`${SET}/${missing}`);
    expect(nowhere.status).toBe(404);
    const calls: [string, unknown, string][] = [
      [`${SET}/${ids.setId}`, undefined, "GET"],
      [`${SET}/${ids.setId}`, { clockOffsetS: 30 }, "PATCH"],
      [`${SET}/${ids.setId}/uploads`, { fileName: "intruder.tif", sizeBytes: 10 }, "POST"],
      [`${SET}/${ids.setId}/frames/${ids.frameId}`, { included: false }, "PATCH"],
      [`${SET}/${ids.setId}/frames/${ids.frameId}/thumbnail`, undefined, "GET"],
      [`${SET}/${ids.setId}/frames/${ids.frameId}/original`, undefined, "GET"],
      [`${SET}/${ids.setId}/groups`, { action: "split", frameId: ids.frameId }, "POST"],
      [`${SET}/${ids.setId}/submit`, {}, "POST"],
    ];
    for (const [path, body, method] of calls) {
      const res = await other.json(path, body, method);
      expect(res.status, `${method} ${path}`).toBe(404);
      expect(res.body).toEqual(nowhere.body);
    }
    const list = (await other.json(SET)).body as { bracketSets: { id: string }[] };
    expect(list.bracketSets.map((s) => s.id)).not.toContain(ids.setId);
    const own = (await clients.member.json(`${SET}/${ids.setId}`)).body as { clockOffsetS: number; frames: { id: string; included: boolean }[] };
    expect(own.clockOffsetS).toBe(0);
    expect(own.frames.find((f) => f.id === ids.frameId)?.included).toBe(true);
  });

  it("keeps the admin's people list free of password hashes and tokens", async () => {
    const { body } = await clients.admin.json("/api/admin/people?pageSize=100");
    const text = JSON.stringify(body);
    expect(text).not.toMatch(/password|token|\$argon|scrypt/i);
  });

  it("answers a malformed role change with the field, what was expected and what came", async () => {
    const { status, body } = await clients.admin.json(`/api/admin/people/${memberId}/roles`, { role: "emperor", grant: "yes" });
    expect(status).toBe(400);
    const fields = (body as { error: { fields: { field: string; message: string }[] } }).error.fields;
    expect(fields.map((f) => f.field).sort()).toEqual(["grant", "role"]);
    const role = (fields as { field: string; message: string; received?: string }[]).find((f) => f.field === "role");
    expect(role?.message).toMatch(/expected one of member, curator, editor, admin/);
    // What came is kept apart from the sentence a person reads.
    expect(role?.received).toBe('"emperor"');
  });
});

// ---- Server actions (issue 15, part B) -------------------------------------
// Every "use server" export, called over HTTP the way React calls it (the
// Next-Action header and the arguments encoded by React's own encodeReply) by
// every role, with an empty form. The wrapper checks the session and the
// permission before the input, so a refused role gets the sign-in or roles
// message, and a permitted one gets as far as the form's own field problems:
// nothing is created. Action ids come from the build the tests run against.

type ActionOutcome = "sign-in" | "refused" | "fields" | "saved";
const ACTION_OK = { visitor: "sign-in", member: "fields", curator: "fields", editor: "fields", admin: "fields" } as const;
const ACTION_ADMIN = { visitor: "sign-in", member: "refused", curator: "refused", editor: "refused", admin: "fields" } as const;
// The catalogue's one save has no required field: an empty form saves nothing, and says so.
const ACTION_ADMIN_SAVE = { ...ACTION_ADMIN, admin: "saved" } as const;

/** Each server action: its file, its export, and who may call it. */
const ACTION_CASES: { file: string; name: string; expect: Record<Who, ActionOutcome> }[] = [
  { file: "app/(desk)/admin/settings/actions.ts", name: "saveSettingsAction", expect: ACTION_ADMIN },
  { file: "app/(desk)/admin/eclipses/actions.ts", name: "saveCatalogueAction", expect: ACTION_ADMIN_SAVE },
  { file: "app/(desk)/admin/people/actions.ts", name: "changeRoleAction", expect: ACTION_ADMIN },
  { file: "app/(desk)/admin/people/actions.ts", name: "setDisabledAction", expect: ACTION_ADMIN },
  { file: "app/(desk)/admin/people/actions.ts", name: "inviteAction", expect: ACTION_ADMIN },
  { file: "app/(studio)/studio/sites/actions.ts", name: "updateSiteAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/sites/actions.ts", name: "createSiteAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/sites/actions.ts", name: "deleteSiteAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/sets/actions.ts", name: "createBracketSetAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/kits/actions.ts", name: "createKitAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/kits/actions.ts", name: "updateKitAction", expect: ACTION_OK },
  { file: "app/(studio)/studio/kits/actions.ts", name: "deleteKitAction", expect: ACTION_OK },
  { file: "app/(public)/planner/actions.ts", name: "savePlanAction", expect: ACTION_OK },
];

/** Every exported server action in the source: "use server" files and their exports. */
function serverActionsInSource(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/\.(ts|tsx)$/.test(e.name)) {
        const text = fs.readFileSync(p, "utf8");
        if (!/^\s*["']use server["']/.test(text)) continue;
        for (const m of text.matchAll(/^export (?:const|async function) (\w+)/gm)) out.push(`${path.relative(path.resolve("."), p)}#${m[1]}`);
      }
    }
  };
  for (const root of ["app", "lib", "components"]) walk(path.resolve(root));
  return out.sort();
}

interface ManifestEntry {
  exportedName?: string;
  filename?: string;
  workers: Record<string, unknown>;
}

function distDir(): string {
  const lane = process.env.TEST_LANE ?? "0";
  return process.env.NEXT_DIST_DIR ?? `.next-test${lane === "0" ? "" : `_lane${lane}`}`;
}

/** The action's id and a page that serves it, from the build's server-reference manifest. */
function findAction(file: string, name: string): { id: string; page: string } {
  const manifest = JSON.parse(fs.readFileSync(path.join(distDir(), "server", "server-reference-manifest.json"), "utf8")) as { node: Record<string, ManifestEntry> };
  const found = Object.entries(manifest.node).find(([, v]) => v.filename === file && v.exportedName === name);
  if (!found) throw new Error(`${file}#${name} is not in the build's server-reference manifest`);
  // "app/(studio)/studio/sites/[id]/page" -> a page URL without dynamic segments, if there is one.
  const pages = Object.keys(found[1].workers).map((w) => w.replace(/^app/, "").replace(/\/page$/, "").replace(/\/\([^/]+\)/g, "") || "/");
  const page = pages.find((p) => !p.includes("[")) ?? pages[0].replace(/\[[^\]]+\]/g, "00000000-0000-4000-8000-000000000000");
  return { id: found[0], page };
}

const encodeReply = (createRequire(import.meta.url)("next/dist/compiled/react-server-dom-turbopack/client.node") as {
  encodeReply: (args: unknown[]) => Promise<FormData | string>;
}).encodeReply;

async function callAction(client: Client, file: string, name: string): Promise<{ status: number; outcome: string; message: string }> {
  const { id, page } = findAction(file, name);
  const encoded = await encodeReply([null, new FormData()]);
  const form = typeof encoded === "string" ? null : encoded;
  const boundary = `----matrix${Date.now().toString(16)}`;
  const body = form
    ? Buffer.concat([...[...form.entries()].map(([k, v]) => Buffer.from(`--${boundary}\r\ncontent-disposition: form-data; name="${k}"\r\n\r\n${String(v)}\r\n`)), Buffer.from(`--${boundary}--\r\n`)])
    : Buffer.from(encoded as string);
  const res = await client.request(page, {
    method: "POST",
    headers: { "next-action": id, accept: "text/x-component", "content-type": form ? `multipart/form-data; boundary=${boundary}` : "text/plain;charset=UTF-8" },
    body,
  });
  const text = await res.text();
  const m = /"ok":(true|false),"message":"((?:[^"\\]|\\.)*)"/.exec(text);
  if (!m) return { status: res.status, outcome: `no result (${text.slice(0, 120)})`, message: "" };
  const message = JSON.parse(`"${m[2]}"`) as string;
  const outcome = message === "Sign in to continue." ? "sign-in" : message.startsWith("Your roles do not allow") ? "refused" : /marked field/.test(message) ? "fields" : /^Nothing had changed/.test(message) ? "saved" : `other: ${message}`;
  return { status: res.status, outcome, message };
}

describe("permission matrix: server actions", () => {
  it("covers every server action in the source", () => {
    expect(serverActionsInSource()).toEqual(ACTION_CASES.map((c) => `${c.file}#${c.name}`).sort());
  });

  for (const c of ACTION_CASES) {
    for (const who of WHO) {
      it(`server action ${c.name} as ${who}: ${c.expect[who]}`, async () => {
        const { status, outcome } = await callAction(clients[who], c.file, c.name);
        expect(status).toBe(200);
        expect(outcome).toBe(c.expect[who]);
      });
    }
  }
});
// ---- end of server actions --------------------------------------------------
