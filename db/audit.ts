import type { Db } from "./client";
import { appendEvent } from "./events";
import { auditLog } from "./schema";

export type AuditEntry = {
  actorUserId?: number | null;
  actor: string;
  action: string;
  targetType?: string;
  targetId?: string | number;
  siteId?: number | null;
  /** Set when the change concerns one compressor, so its event-log entry links to it. */
  compressorId?: number | null;
  ip?: string;
  details?: Record<string, unknown>;
};

const auditSentences: Record<string, (e: AuditEntry) => string> = {
  "auth.sign_in": (e) => `${e.actor} signed in`,
  "auth.sign_in_failed": (e) => `Failed sign-in for ${e.actor} (${String(e.details?.reason ?? "wrong password")})`,
  "auth.sign_in_throttled": (e) => `Sign-in for ${e.actor} refused: too many failures`,
  "auth.sign_out": (e) => `${e.actor} signed out`,
  "threshold.update": (e) => {
    const n = Array.isArray(e.details?.changes) ? e.details.changes.length : 0;
    const reason = typeof e.details?.reason === "string" ? `: ${e.details.reason}` : "";
    return `${e.actor} changed ${n} threshold limit${n === 1 ? "" : "s"} of ${String(e.details?.label ?? `${e.targetType} ${e.targetId}`)}${reason}`;
  },
};

function describe(e: AuditEntry): string {
  const sentence = auditSentences[e.action];
  if (sentence) return sentence(e);
  const target = e.targetType ? ` ${e.targetType.replace(/_/g, " ")}${e.targetId != null ? ` ${e.targetId}` : ""}` : "";
  const label = typeof e.details?.label === "string" ? ` “${e.details.label}”` : "";
  return `${e.actor}: ${e.action.replace(/[._]/g, " ")}${target}${label}`;
}

/** Writes the audit row and its entry in the searchable event log. */
export function writeAudit(db: Db, entry: AuditEntry, ts = Date.now()): void {
  appendEvent(db, {
    ts,
    kind: entry.action.startsWith("auth.") ? "auth" : entry.action.startsWith("threshold") ? "threshold" : "config",
    action: entry.action,
    text: describe(entry),
    siteId: entry.siteId ?? null,
    compressorId: entry.compressorId ?? null,
    actor: entry.actor,
    details: entry.details ?? null,
  });
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
