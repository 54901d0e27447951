import type { Db } from "@/db/client";
import { fillHourMetersFromTelemetry, serviceDueList } from "@/db/service";
import { compressors } from "@/db/schema";
import { eq } from "drizzle-orm";
import { syncConditionAlarms } from "@/db/alarm-conditions";
import type { AlarmTransition } from "@/db/alarm-transitions";
import type { ServiceDueDto } from "@/shared/service-schema";

// Service tasks coming due raise an advisory, overdue ones a warning (condition alarms: same lifecycle, event log and
// e-mail as every alarm); both clear once the task is logged, its plan changes or the compressor leaves service.

export const SERVICE_DUE_FAMILY = "service-due";
export const SERVICE_OVERDUE_FAMILY = "service-overdue";

const fmtHours = (h: number) => `${Math.round(h).toLocaleString("en-GB")} h`;

export function dueDetail(d: ServiceDueDto): string {
  const parts: string[] = [];
  if (d.dueHours !== null) parts.push(`at ${fmtHours(d.dueHours)}${d.hourMeterH !== null ? ` (meter ${fmtHours(d.hourMeterH)})` : ""}`);
  if (d.dueDate !== null) parts.push(`by ${d.dueDate}`);
  return `${d.name} due ${parts.join(" or ")}`;
}

/** Sweeps every compressor (or one) and makes its service alarms match its tasks' status now. */
export function syncServiceAlarms(db: Db, now = Date.now(), compressorId?: number): AlarmTransition[] {
  if (compressorId === undefined) db.transaction(() => fillHourMetersFromTelemetry(db), { behavior: "immediate" });
  const list = serviceDueList(db, now, null, compressorId);
  const byUnit = new Map<number, ServiceDueDto[]>();
  const ids = db
    .select({ id: compressors.id })
    .from(compressors)
    .where(compressorId !== undefined ? eq(compressors.id, compressorId) : undefined)
    .all()
    .map((r) => r.id);
  for (const id of ids) byUnit.set(id, []);
  for (const d of list) byUnit.get(d.compressorId)?.push(d);
  const out: AlarmTransition[] = [];
  for (const [id, tasks] of byUnit) {
    const wanted = (status: "due" | "overdue", priority: "advisory" | "warning") =>
      tasks.filter((t) => t.status === status).map((t) => ({ subject: t.code, priority, detail: dueDetail(t) }));
    out.push(...syncConditionAlarms(db, id, SERVICE_OVERDUE_FAMILY, wanted("overdue", "warning"), now, "no longer overdue"));
    out.push(...syncConditionAlarms(db, id, SERVICE_DUE_FAMILY, wanted("due", "advisory"), now, "no longer coming due"));
  }
  return out;
}
