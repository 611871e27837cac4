import "server-only";
import { notFound } from "next/navigation";
import { AppError } from "@/lib/errors";

/**
 * The value, or Next.js's 404 page when the service says "not found" (which it
 * also says for what the actor may not see, so ids do not leak).
 */
export async function foundOr404<T>(work: Promise<T>): Promise<T> {
  try {
    return await work;
  } catch (err) {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  }
}
