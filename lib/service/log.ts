import type { Db } from "@/db/client";
import { writeAudit } from "@/db/audit";
import { getCompressor } from "@/db/compressors";
import {
  deleteServiceTask,
  effectivePlans,
  findBySubmission,
  getServiceLog,
  hourMeterAt,
  insertServiceLog,
  insertServiceWindow,
  overlappingWindow,
  setServiceLead,
  updateServiceLog,
  upsertServiceTask,
} from "@/db/service";
import { getModel } from "@/db/compressors";
import { ActionFailure } from "@/lib/api/action";
import { inScope } from "@/lib/auth/current-user";
import type { CompressorDto } from "@/shared/compressor-schema";
import type {
  ServiceLead,
  ServiceLogCorrection,
  ServiceLogInput,
  ServiceTaskInput,
  ServiceWindowInput,
} from "@/shared/service-schema";
import { syncServiceAlarms } from "./alarms";

// Recording service: each function checks the site scope and the facts the schema cannot (the tasks belong to the
// compressor's plan, the time is not in the future), writes in one IMMEDIATE transaction with its audit row and
// event-log entry, then brings the compressor's service alarms up to date.

export type ServiceActor = { id: number; name: string; email: string; siteIds: number[] | null; ip?: string };

const FUTURE_SLACK_MS = 5 * 60_000;
const OLDEST_MS = 20 * 365 * 86_400_000;

function compressorFor(db: Db, actor: ServiceActor, id: number): CompressorDto {
  const c = getCompressor(db, id);
  // Outside the person's sites answers like a compressor that does not exist.
  if (!c || !inScope(actor, c.siteId)) throw new ActionFailure(404, "No such compressor.");
  return c;
}

function checkTime(doneAt: number, now: number, field = "doneAt") {
  if (doneAt > now + FUTURE_SLACK_MS) throw new ActionFailure(400, "Some values need correcting.", { [field]: ["The time lies in the future"] });
  if (doneAt < now - OLDEST_MS) throw new ActionFailure(400, "Some values need correcting.", { [field]: ["The time is more than 20 years ago"] });
}

function planTasks(db: Db, c: CompressorDto, codes: readonly string[]) {
  const plan = effectivePlans(db, { compressorIds: [c.id] }).get(c.id) ?? [];
  const byCode = new Map(plan.map((t) => [t.code, t]));
  const unknown = codes.filter((code) => !byCode.has(code));
  if (unknown.length) throw new ActionFailure(400, "Some values need correcting.", { tasks: [`Not in this compressor's plan: ${unknown.join(", ")}`] });
  return [...new Set(codes)].map((code) => ({ code, name: byCode.get(code)!.name }));
}

function resolveHours(db: Db, c: CompressorDto, given: number | null, doneAt: number): number | null {
  return given ?? hourMeterAt(db, c.id, doneAt);
}

const immediate = <T>(db: Db, fn: () => T): T => db.transaction(fn, { behavior: "immediate" });

export type LogResult = { id: number; duplicate: boolean; compressorId: number };

export function recordServiceLog(db: Db, actor: ServiceActor, input: ServiceLogInput, now = Date.now()): LogResult {
  const c = compressorFor(db, actor, input.compressorId);
  checkTime(input.doneAt, now);
  const tasks = planTasks(db, c, input.tasks);
  const hourMeterH = resolveHours(db, c, input.hourMeterH, input.doneAt);
  const result = immediate(db, () => {
    // A repeated submit (double click, a retry after a lost answer) finds the entry the first one made.
    const existing = findBySubmission(db, input.submissionId);
    if (existing) {
      if (existing.compressorId !== c.id || existing.performedBy !== actor.id) throw new ActionFailure(409, "This form was already used for another entry. Reload and try again.");
      return { id: existing.id, duplicate: true, compressorId: c.id };
    }
    const row = insertServiceLog(
      db,
      {
        compressorId: c.id,
        siteId: c.siteId,
        doneAt: input.doneAt,
        hourMeterH,
        tasks,
        parts: input.parts,
        notes: input.notes,
        performedBy: actor.id,
        performedByName: actor.name,
        submissionId: input.submissionId,
      },
      now,
    );
    writeAudit(
      db,
      {
        actorUserId: actor.id,
        actor: actor.email,
        action: "service.log",
        targetType: "service_log",
        targetId: row.id,
        siteId: c.siteId,
        compressorId: c.id,
        ip: actor.ip,
        eventKind: "service",
        details: { compressorName: c.name, taskNames: tasks.map((t) => t.name).join(", "), tasks: tasks.map((t) => t.code), hourMeterH, doneAt: input.doneAt, parts: input.parts, notes: input.notes },
      },
      now,
    );
    return { id: row.id, duplicate: false, compressorId: c.id };
  });
  syncServiceAlarms(db, now, c.id);
  return result;
}

/** Restarts one task's interval without a full log entry (done elsewhere, or a plan just introduced). */
export function resetServiceInterval(
  db: Db,
  actor: ServiceActor,
  input: { compressorId: number; code: string; reason: string; submissionId: string },
  now = Date.now(),
): LogResult {
  const c = compressorFor(db, actor, input.compressorId);
  const tasks = planTasks(db, c, [input.code]);
  const hourMeterH = resolveHours(db, c, null, now);
  const result = immediate(db, () => {
    const existing = findBySubmission(db, input.submissionId);
    if (existing) return { id: existing.id, duplicate: true, compressorId: c.id };
    const row = insertServiceLog(
      db,
      {
        compressorId: c.id,
        siteId: c.siteId,
        doneAt: now,
        hourMeterH,
        tasks,
        parts: "",
        notes: `Interval reset: ${input.reason}`,
        performedBy: actor.id,
        performedByName: actor.name,
        submissionId: input.submissionId,
      },
      now,
    );
    writeAudit(
      db,
      {
        actorUserId: actor.id,
        actor: actor.email,
        action: "service.reset",
        targetType: "service_log",
        targetId: row.id,
        siteId: c.siteId,
        compressorId: c.id,
        ip: actor.ip,
        eventKind: "service",
        details: { compressorName: c.name, taskNames: tasks[0]!.name, tasks: [input.code], hourMeterH, reason: input.reason },
      },
      now,
    );
    return { id: row.id, duplicate: false, compressorId: c.id };
  });
  syncServiceAlarms(db, now, c.id);
  return result;
}

export function correctServiceEntry(db: Db, actor: ServiceActor, input: ServiceLogCorrection, now = Date.now()): { id: number } {
  const before = getServiceLog(db, input.id);
  if (!before || !inScope(actor, before.siteId)) throw new ActionFailure(404, "No such service entry.");
  const c = compressorFor(db, actor, before.compressorId);
  checkTime(input.doneAt, now);
  // Tasks already on the entry stay acceptable even if the plan has changed since.
  const known = new Map(before.tasks.map((t) => [t.code, t]));
  const fromPlan = planTasks(
    db,
    c,
    input.tasks.filter((code) => !known.has(code)),
  );
  const tasks = [...input.tasks.filter((code) => known.has(code)).map((code) => known.get(code)!), ...fromPlan];
  const after = { doneAt: input.doneAt, hourMeterH: input.hourMeterH, tasks, parts: input.parts, notes: input.notes };
  immediate(db, () => {
    updateServiceLog(db, input.id, after, actor.id, now);
    writeAudit(
      db,
      {
        actorUserId: actor.id,
        actor: actor.email,
        action: "service.correct",
        targetType: "service_log",
        targetId: input.id,
        siteId: c.siteId,
        compressorId: c.id,
        ip: actor.ip,
        eventKind: "service",
        details: {
          compressorName: c.name,
          reason: input.reason,
          before: { doneAt: before.doneAt, hourMeterH: before.hourMeterH, tasks: before.tasks, parts: before.parts, notes: before.notes },
          after,
        },
      },
      now,
    );
  });
  syncServiceAlarms(db, now, c.id);
  return { id: input.id };
}

export function addServiceWindow(db: Db, actor: ServiceActor, input: ServiceWindowInput, now = Date.now()): { id: number } {
  const c = compressorFor(db, actor, input.compressorId);
  return immediate(db, () => {
    // Checked inside the write lock, so two overlapping windows entered at once cannot both pass.
    const clash = overlappingWindow(db, c.id, input.startAt, input.endAt);
    if (clash) throw new ActionFailure(409, `This overlaps the planned service window “${clash.reason}” already entered for ${c.name}.`);
    const row = insertServiceWindow(
      db,
      { compressorId: c.id, siteId: c.siteId, compressorName: c.name, startAt: input.startAt, endAt: input.endAt, reason: input.reason, createdBy: actor.id, actor: actor.name },
      now,
    );
    return { id: row.id };
  });
}

function intervalWords(t: ServiceTaskInput): string {
  if (!t.enabled) return "switched off";
  const parts = [t.everyHours !== null ? `every ${t.everyHours} h` : null, t.everyMonths !== null ? `every ${t.everyMonths} months` : null].filter(Boolean);
  return parts.join(" or ");
}

function scopeLabel(db: Db, actor: ServiceActor, scopeType: "model" | "compressor", scopeId: number): { label: string; siteId: number | null; compressorId: number | null } {
  if (scopeType === "compressor") {
    const c = compressorFor(db, actor, scopeId);
    return { label: c.name, siteId: c.siteId, compressorId: c.id };
  }
  const m = getModel(db, scopeId);
  if (!m) throw new ActionFailure(404, "No such model.");
  return { label: `model ${m.name}`, siteId: null, compressorId: null };
}

export function saveServiceTask(db: Db, actor: ServiceActor, scopeType: "model" | "compressor", scopeId: number, task: ServiceTaskInput, now = Date.now()): void {
  // A model's plan reaches every site: only people who see every site may change it.
  if (scopeType === "model" && actor.siteIds !== null) throw new ActionFailure(404, "No such model.");
  const where = scopeLabel(db, actor, scopeType, scopeId);
  immediate(db, () => {
    const before = upsertServiceTask(db, scopeType, scopeId, task, actor.id, now);
    writeAudit(
      db,
      {
        actorUserId: actor.id,
        actor: actor.email,
        action: "service.plan_save",
        targetType: `service_plan_${scopeType}`,
        targetId: scopeId,
        siteId: where.siteId,
        compressorId: where.compressorId,
        eventKind: "service",
        details: { label: where.label, name: task.name, interval: intervalWords(task), before, after: task },
      },
      now,
    );
  });
  syncServiceAlarms(db, now, where.compressorId ?? undefined);
}

export function removeServiceTask(db: Db, actor: ServiceActor, scopeType: "model" | "compressor", scopeId: number, code: string, now = Date.now()): void {
  if (scopeType === "model" && actor.siteIds !== null) throw new ActionFailure(404, "No such model.");
  const where = scopeLabel(db, actor, scopeType, scopeId);
  immediate(db, () => {
    const before = deleteServiceTask(db, scopeType, scopeId, code);
    if (!before) throw new ActionFailure(404, "No such task.");
    writeAudit(
      db,
      {
        actorUserId: actor.id,
        actor: actor.email,
        action: "service.plan_remove",
        targetType: `service_plan_${scopeType}`,
        targetId: scopeId,
        siteId: where.siteId,
        compressorId: where.compressorId,
        eventKind: "service",
        details: { label: where.label, name: before.name, before },
      },
      now,
    );
  });
  syncServiceAlarms(db, now, where.compressorId ?? undefined);
}

export function saveServiceLead(db: Db, actor: ServiceActor, lead: ServiceLead, now = Date.now()): void {
  if (actor.siteIds !== null) throw new ActionFailure(409, "The lead applies to every site: only people who see every site may change it.");
  immediate(db, () => {
    setServiceLead(db, lead, now);
    writeAudit(db, { actorUserId: actor.id, actor: actor.email, action: "service.lead", eventKind: "service", details: { ...lead } }, now);
  });
  syncServiceAlarms(db, now);
}
