import { toNextJsHandler } from "better-auth/next-js";
import { getAuth } from "@/lib/auth/auth";

// better-auth's own endpoints (sign-up, sign-in, verification, reset). Its
// handler is built on first request so that the build needs no environment.
export const dynamic = "force-dynamic";

export async function GET(req: Request) {
  return toNextJsHandler(getAuth()).GET(req);
}

export async function POST(req: Request) {
  return toNextJsHandler(getAuth()).POST(req);
}
