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
  /** Event-log kind when the action's prefix does not say it (e.g. "service" for attachments of a service entry). */
  eventKind?: string;
};

const str = (v: unknown) => (typeof v === "string" ? v : "");

const auditSentences: Record<string, (e: AuditEntry) => string> = {
  "service.log": (e) => `${e.actor} logged service on ${str(e.details?.compressorName)}: ${str(e.details?.taskNames)}${typeof e.details?.hourMeterH === "number" ? ` at ${Math.round(e.details.hourMeterH)} h` : ""}${e.details?.notes ? ` (${str(e.details.notes).slice(0, 120)})` : ""}`,
  "service.reset": (e) => `${e.actor} reset the interval of ${str(e.details?.taskNames)} on ${str(e.details?.compressorName)}: ${str(e.details?.reason)}`,
  "service.correct": (e) => `${e.actor} corrected service entry ${e.targetId} on ${str(e.details?.compressorName)}: ${str(e.details?.reason)}`,
  "service.plan_save": (e) => `${e.actor} set service task “${str(e.details?.name)}” of ${str(e.details?.label)}: ${str(e.details?.interval)}`,
  "service.plan_remove": (e) => `${e.actor} removed service task “${str(e.details?.name)}” from ${str(e.details?.label)}`,
  "service.lead": (e) => `${e.actor} set the service lead to ${String(e.details?.leadHours)} h / ${String(e.details?.leadDays)} days`,
  "attachment.upload": (e) => `${e.actor} attached “${str(e.details?.name)}” to ${str(e.details?.label)}`,
  "attachment.rejected": (e) => `Upload “${str(e.details?.name)}” by ${e.actor} to ${str(e.details?.label)} refused (${str(e.details?.reason)})`,
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
    kind: entry.eventKind ?? (entry.action.startsWith("auth.") ? "auth" : entry.action.startsWith("threshold") ? "threshold" : "config"),
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
