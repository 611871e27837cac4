import { desc, eq, and } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { auditLog, type AuditEntry } from "@/db/schema";

export interface AuditDraft {
  actorId: string | null;
  action: string;
  subjectType: string;
  subjectId: string;
  detail?: Record<string, unknown>;
}

export async function recordAudit(db: DbOrTx, entry: AuditDraft): Promise<void> {
  await db.insert(auditLog).values({ ...entry, detail: entry.detail ?? {} });
}

export async function findAuditForSubject(db: DbOrTx, subjectType: string, subjectId: string, limit = 50): Promise<AuditEntry[]> {
  return db
    .select()
    .from(auditLog)
    .where(and(eq(auditLog.subjectType, subjectType), eq(auditLog.subjectId, subjectId)))
    .orderBy(desc(auditLog.id))
    .limit(limit);
}
