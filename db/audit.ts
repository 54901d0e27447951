import { and, count, eq, gte } from "drizzle-orm";
import type { Db } from "./client";
import { auditLog } from "./schema";

export type AuditEntry = {
  actorUserId?: number | null;
  actor: string;
  action: string;
  targetType?: string;
  targetId?: string | number;
  siteId?: number | null;
  ip?: string;
  details?: Record<string, unknown>;
};

export function writeAudit(db: Db, entry: AuditEntry, ts = Date.now()): void {
  db.insert(auditLog)
    .values({
      ts,
      actorUserId: entry.actorUserId ?? null,
      actor: entry.actor,
      action: entry.action,
      targetType: entry.targetType ?? null,
      targetId: entry.targetId == null ? null : String(entry.targetId),
      siteId: entry.siteId ?? null,
      ip: entry.ip ?? "",
      details: entry.details ?? null,
    })
    .run();
}

export function countAuditByActor(db: Db, action: string, actor: string, since: number): number {
  const row = db
    .select({ n: count() })
    .from(auditLog)
    .where(and(eq(auditLog.action, action), eq(auditLog.actor, actor), gte(auditLog.ts, since)))
    .get();
  return row?.n ?? 0;
}

export function countAuditByIp(db: Db, action: string, ip: string, since: number): number {
  const row = db
    .select({ n: count() })
    .from(auditLog)
    .where(and(eq(auditLog.action, action), eq(auditLog.ip, ip), gte(auditLog.ts, since)))
    .get();
  return row?.n ?? 0;
}
