// Calls every route handler and every role-gated page as a visitor, a member,
// a curator, an editor and an admin, and checks the status codes. A route file
// that is not in the matrix fails the test, so new routes must be added here.
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
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

interface Case {
  /** The route file's path template, e.g. /api/admin/people/[id]/roles */
  route: string;
  method: "GET" | "POST";
  /** A concrete path to call; ids are filled in at run time. */
  path: (ids: { memberId: string }) => string;
  body?: unknown;
  expect: Record<Who, number>;
}

const everyone = (status: number): Record<Who, number> => ({ visitor: status, member: status, curator: status, editor: status, admin: status });
const signedIn = { visitor: 401, member: 200, curator: 200, editor: 200, admin: 200 };
const adminOnly = { visitor: 401, member: 403, curator: 403, editor: 403, admin: 200 };

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
];

const PAGE_CASES: { path: string; expect: Record<Who, number> }[] = [
  { path: "/", expect: everyone(200) },
  { path: "/sign-in", expect: everyone(200) },
  // A visitor is sent to sign in (307); a signed-in person without the role sees 403.
  { path: "/studio", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/review", expect: { visitor: 307, member: 403, curator: 200, editor: 403, admin: 403 } },
  { path: "/editions", expect: { visitor: 307, member: 403, curator: 403, editor: 200, admin: 403 } },
  { path: "/admin/people", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin/settings", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/admin/eclipses", expect: { visitor: 307, member: 403, curator: 403, editor: 403, admin: 200 } },
  { path: "/eclipses", expect: everyone(200) },
  { path: "/planner", expect: everyone(200) },
  { path: "/studio/kits", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/kits/new", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/sites", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
  { path: "/studio/sites/new", expect: { visitor: 307, member: 200, curator: 200, editor: 200, admin: 200 } },
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

beforeAll(async () => {
  clients.visitor = new Client();
  for (const who of WHO.filter((w): w is Exclude<Who, "visitor"> => w !== "visitor")) {
    clients[who] = new Client();
    await clients[who].signIn(EMAIL[who], DEMO_PASSWORD);
  }
  const me = await clients.member.json("/api/me");
  memberId = (me.body as { id: string }).id;
});

describe("permission matrix", () => {
  it("covers every route handler in app/", () => {
    expect(routeTemplates()).toEqual([...new Set(API_CASES.map((c) => c.route))].sort());
  });

  for (const c of API_CASES) {
    for (const who of WHO) {
      it(`${c.method} ${c.route} as ${who} answers ${c.expect[who]}`, async () => {
        const { status } = await clients[who].json(c.path({ memberId }), c.body, c.method);
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

  it("lets nobody plan from another person's saved site", async () => {
    const someone = "/api/planner/calendar?eclipse=2027-08-02&site=" + "00000000-0000-4000-8000-000000000000";
    expect((await clients.visitor.json(someone)).status).toBe(401);
    expect((await clients.member.json(someone)).status).toBe(404);
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
    expect(fields.find((f) => f.field === "role")?.message).toMatch(/expected one of member, curator, editor, admin.*"emperor"/);
  });
});
