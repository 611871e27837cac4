// The one wrapper for route handlers: session, permission, input validation
// and error mapping, so no handler repeats them. Handlers return a plain
// object (sent as JSON) or a Response.
import type { z } from "zod";
import { findActor, requirePermission, requireSignedIn, type Actor } from "@/lib/auth/actor";
import type { Action } from "@/lib/auth/permissions";
import { toErrorBody } from "@/lib/errors";
import { parseInput } from "@/lib/validation";
import { MAX_JSON_BODY_BYTES, readJsonBody, requireSameOrigin } from "./request-guards";

type Access = { kind: "public" } | { kind: "signed-in" } | { kind: "permission"; action: Action };

export const PUBLIC: Access = { kind: "public" };
export const SIGNED_IN: Access = { kind: "signed-in" };
export const permission = (action: Action): Access => ({ kind: "permission", action });

interface RouteContext<Q, B> {
  req: Request;
  actor: Actor | null;
  params: Record<string, string>;
  query: Q;
  body: B;
}

interface RouteOptions<QS extends z.ZodType | undefined, BS extends z.ZodType | undefined> {
  access: Access;
  query?: QS;
  body?: BS;
  /** Largest JSON body accepted, in bytes (MAX_JSON_BODY_BYTES unless said). */
  maxBodyBytes?: number;
}

type Infer<S> = S extends z.ZodType ? z.infer<S> : undefined;

export function json(data: unknown, init: ResponseInit = {}): Response {
  const headers = new Headers(init.headers);
  headers.set("content-type", "application/json");
  if (!headers.has("cache-control")) headers.set("cache-control", "no-store");
  return new Response(JSON.stringify(data), { ...init, headers });
}

export function route<QS extends z.ZodType | undefined = undefined, BS extends z.ZodType | undefined = undefined>(
  options: RouteOptions<QS, BS>,
  handler: (ctx: RouteContext<Infer<QS>, Infer<BS>>) => Promise<unknown>,
) {
  return async (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }): Promise<Response> => {
    try {
      // Cross-site forms and scripts cannot change anything, whatever the cookie's SameSite.
      requireSameOrigin(req);
      const actor = options.access.kind === "public" ? await findActor(req.headers).catch(() => null) : await findActor(req.headers);
      if (options.access.kind === "signed-in") requireSignedIn(actor);
      if (options.access.kind === "permission") requirePermission(actor, options.access.action);

      const rawParams = (await ctx?.params) ?? {};
      const params = Object.fromEntries(Object.entries(rawParams).map(([k, v]) => [k, Array.isArray(v) ? v.join("/") : v]));
      const query = options.query
        ? parseInput(options.query, Object.fromEntries(new URL(req.url).searchParams))
        : undefined;
      let body: unknown = undefined;
      if (options.body) body = parseInput(options.body, await readJsonBody(req, options.maxBodyBytes ?? MAX_JSON_BODY_BYTES));
      const result = await handler({ req, actor, params, query: query as Infer<QS>, body: body as Infer<BS> });
      return result instanceof Response ? result : json(result ?? { ok: true });
    } catch (err) {
      const { status, body } = toErrorBody(err);
      return json(body, { status });
    }
  };
}
