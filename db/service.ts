import { and, desc, eq, gt, inArray, lt, sql } from "drizzle-orm";
import { PLANNED_END, PLANNED_START } from "@/shared/availability";
import { computeDue, statusRank } from "@/shared/service-due";
import {
  defaultServiceLead,
  serviceLeadSchema,
  type ServiceBadge,
  type ServiceDueDto,
  type ServiceLead,
  type ServiceLogDto,
  type ServiceTaskDto,
  type ServiceTaskInput,
  type ServiceWindowDto,
} from "@/shared/service-schema";
import { attachmentDto, listAttachments } from "./attachments";
import type { Db } from "./client";
import { appendEvent } from "./events";
import { compressors, serviceLog, serviceTasks, serviceWindows, settings, sites } from "./schema";

const DAY_MS = 86_400_000;
/** Run hours per day are judged over this many recent days. */
const RATE_WINDOW_DAYS = 30;
const LEAD_KEY = "service.lead";

// ---------------------------------------------------------------- plans

type TaskRow = typeof serviceTasks.$inferSelect;

function toTask(r: TaskRow, source: ServiceTaskDto["source"]): ServiceTaskDto {
  return { code: r.code, name: r.name, everyHours: r.everyHours, everyMonths: r.everyMonths, enabled: r.enabled, note: r.note, source };
}

/**
 * Each compressor's plan: its model's tasks, each replaced by the compressor's row with the same code (an override,
 * which may switch the task off), plus the compressor's own tasks. Disabled tasks are left out unless asked for.
 */
export function effectivePlans(db: Db, opts: { includeDisabled?: boolean; compressorIds?: readonly number[] } = {}): Map<number, ServiceTaskDto[]> {
  const units = db
    .select({ id: compressors.id, modelId: compressors.modelId })
    .from(compressors)
    .where(opts.compressorIds ? inArray(compressors.id, [...opts.compressorIds]) : undefined)
    .all();
  const rows = db.select().from(serviceTasks).all();
  const byModel = new Map<number, TaskRow[]>();
  const byCompressor = new Map<number, TaskRow[]>();
  for (const r of rows) {
    const m = r.scopeType === "model" ? byModel : byCompressor;
    let list = m.get(r.scopeId);
    if (!list) m.set(r.scopeId, (list = []));
    list.push(r);
  }
  const out = new Map<number, ServiceTaskDto[]>();
  for (const u of units) {
    const own = new Map((byCompressor.get(u.id) ?? []).map((r) => [r.code, r]));
    const tasks: ServiceTaskDto[] = [];
    for (const r of byModel.get(u.modelId) ?? []) {
      const o = own.get(r.code);
      own.delete(r.code);
      tasks.push(o ? toTask(o, "override") : toTask(r, "model"));
    }
    for (const r of own.values()) tasks.push(toTask(r, "compressor"));
    out.set(
      u.id,
      tasks.filter((t) => opts.includeDisabled || t.enabled),
    );
  }
  return out;
}

export function modelPlan(db: Db, modelId: number): ServiceTaskDto[] {
  return db
    .select()
    .from(serviceTasks)
    .where(and(eq(serviceTasks.scopeType, "model"), eq(serviceTasks.scopeId, modelId)))
    .all()
    .map((r) => toTask(r, "model"));
}

/** Inserts or replaces one task of a model's plan or a compressor's override; returns the row as it was before. */
export function upsertServiceTask(db: Db, scopeType: "model" | "compressor", scopeId: number, t: ServiceTaskInput, by: number | null, now = Date.now()): TaskRow | null {
  const before =
    db
      .select()
      .from(serviceTasks)
      .where(and(eq(serviceTasks.scopeType, scopeType), eq(serviceTasks.scopeId, scopeId), eq(serviceTasks.code, t.code)))
      .get() ?? null;
  db.insert(serviceTasks)
    .values({ scopeType, scopeId, ...t, updatedAt: now, updatedBy: by })
    .onConflictDoUpdate({
      target: [serviceTasks.scopeType, serviceTasks.scopeId, serviceTasks.code],
      set: { name: t.name, everyHours: t.everyHours, everyMonths: t.everyMonths, enabled: t.enabled, note: t.note, updatedAt: now, updatedBy: by },
    })
    .run();
  return before;
}

export function deleteServiceTask(db: Db, scopeType: "model" | "compressor", scopeId: number, code: string): TaskRow | null {
  return (
    db
      .delete(serviceTasks)
      .where(and(eq(serviceTasks.scopeType, scopeType), eq(serviceTasks.scopeId, scopeId), eq(serviceTasks.code, code)))
      .returning()
      .get() ?? null
  );
}

// ---------------------------------------------------------------- lead settings

export function getServiceLead(db: Db): ServiceLead {
  const row = db.select().from(settings).where(eq(settings.key, LEAD_KEY)).get();
  if (!row) return defaultServiceLead;
  const parsed = serviceLeadSchema.safeParse(JSON.parse(row.value));
  return parsed.success ? parsed.data : defaultServiceLead;
}

export function setServiceLead(db: Db, lead: ServiceLead, now = Date.now()): void {
  db.insert(settings)
    .values({ key: LEAD_KEY, value: JSON.stringify(lead), updatedAt: now })
    .onConflictDoUpdate({ target: settings.key, set: { value: JSON.stringify(lead), updatedAt: now } })
    .run();
}

// ---------------------------------------------------------------- due status

type Unit = {
  id: number;
  name: string;
  siteId: number;
  siteName: string;
  timeZone: string;
  inService: boolean;
  createdAt: number;
  hourMeterH: number | null;
  stateTs: number | null;
};

function units(db: Db, siteIds: readonly number[] | null, compressorId?: number): Unit[] {
  const rows = db.$client
    .prepare(
      `SELECT c.id, c.name, c.site_id AS siteId, s.name AS siteName, s.time_zone AS timeZone, c.in_service AS inService,
              c.created_at AS createdAt, st.hour_meter_h AS hourMeterH, st.ts AS stateTs
       FROM compressors c JOIN sites s ON s.id = c.site_id LEFT JOIN compressor_state st ON st.compressor_id = c.id
       ORDER BY s.name, c.name, c.id`,
    )
    .all() as (Omit<Unit, "inService"> & { inService: number })[];
  return rows
    .filter((r) => (siteIds === null || siteIds.includes(r.siteId)) && (compressorId === undefined || r.id === compressorId))
    .map((r) => ({ ...r, inService: r.inService === 1 }));
}

/** When each task was last done on each compressor: "compressorId|code" → time and hour meter. */
export function lastDone(db: Db): Map<string, { at: number; hours: number | null }> {
  // SQLite takes the bare column (the hour meter) from the row holding max(done_at).
  const rows = db.$client
    .prepare(
      `SELECT l.compressor_id, json_extract(j.value, '$.code') AS code, max(l.done_at), l.hour_meter_h
       FROM service_log l, json_each(l.tasks) j GROUP BY l.compressor_id, code`,
    )
    .raw()
    .all() as [number, string, number, number | null][];
  const out = new Map<string, { at: number; hours: number | null }>();
  for (const [c, code, at, hours] of rows) out.set(`${c}|${code}`, { at, hours });
  return out;
}

/** Each compressor's run hours per day over the recent window, from the hourly rollups' hour meter. */
export function runHoursPerDay(db: Db, now: number): Map<number, number> {
  const since = now - RATE_WINDOW_DAYS * DAY_MS;
  // SQLite takes the bare columns from the row holding min()/max().
  const first = db.$client
    .prepare(`SELECT compressor_id, min(bucket_ts), hour_meter_h FROM readings_1h WHERE bucket_ts >= ? AND hour_meter_h IS NOT NULL GROUP BY compressor_id`)
    .raw()
    .all(since) as [number, number, number][];
  const last = db.$client
    .prepare(`SELECT compressor_id, max(bucket_ts), hour_meter_h FROM readings_1h WHERE bucket_ts >= ? AND hour_meter_h IS NOT NULL GROUP BY compressor_id`)
    .raw()
    .all(since) as [number, number, number][];
  const lastBy = new Map(last.map(([c, ts, h]) => [c, { ts, h }]));
  const out = new Map<number, number>();
  for (const [c, ts, h] of first) {
    const l = lastBy.get(c);
    if (!l || l.ts - ts < DAY_MS) continue;
    out.set(c, Math.max(0, (l.h - h) / ((l.ts - ts) / DAY_MS)));
  }
  return out;
}

export type DueInputs = {
  units: Unit[];
  plans: Map<number, ServiceTaskDto[]>;
  last: Map<string, { at: number; hours: number | null }>;
  rates: Map<number, number>;
  lead: ServiceLead;
};

export function loadDueInputs(db: Db, now: number, siteIds: readonly number[] | null, compressorId?: number): DueInputs {
  const us = units(db, siteIds, compressorId);
  return {
    units: us,
    plans: effectivePlans(db, compressorId !== undefined ? { compressorIds: [compressorId] } : {}),
    last: lastDone(db),
    rates: runHoursPerDay(db, now),
    lead: getServiceLead(db),
  };
}

/** Pure: every task of every compressor given, with its due status. Out-of-service compressors are left out. */
export function computeDueList(inputs: DueInputs, now: number): ServiceDueDto[] {
  const out: ServiceDueDto[] = [];
  for (const u of inputs.units) {
    if (!u.inService) continue;
    const rate = inputs.rates.get(u.id) ?? null;
    for (const t of inputs.plans.get(u.id) ?? []) {
      const last = inputs.last.get(`${u.id}|${t.code}`) ?? null;
      const r = computeDue({
        everyHours: t.everyHours,
        everyMonths: t.everyMonths,
        lastAt: last?.at ?? u.createdAt,
        lastHours: last ? last.hours : 0,
        hourMeterH: u.hourMeterH,
        hoursPerDay: rate,
        now,
        timeZone: u.timeZone,
        leadHours: inputs.lead.leadHours,
        leadDays: inputs.lead.leadDays,
      });
      out.push({
        compressorId: u.id,
        compressorName: u.name,
        siteId: u.siteId,
        siteName: u.siteName,
        timeZone: u.timeZone,
        code: t.code,
        name: t.name,
        everyHours: t.everyHours,
        everyMonths: t.everyMonths,
        lastAt: last?.at ?? null,
        lastHours: last?.hours ?? null,
        hourMeterH: u.hourMeterH,
        hoursPerDay: rate,
        ...r,
      });
    }
  }
  return out;
}

// Plain code-unit order: localeCompare costs a microsecond or more a call, thousands of times per list.
const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/** Overdue first, then soonest forecast (unknown last), then compressor and task. */
export function byUrgency(a: ServiceDueDto, b: ServiceDueDto): number {
  return (
    statusRank[a.status] - statusRank[b.status] ||
    (a.forecastAt ?? Number.MAX_SAFE_INTEGER) - (b.forecastAt ?? Number.MAX_SAFE_INTEGER) ||
    cmp(a.compressorName, b.compressorName) ||
    cmp(a.name, b.name)
  );
}

export function serviceDueList(db: Db, now: number, siteIds: readonly number[] | null, compressorId?: number): ServiceDueDto[] {
  return computeDueList(loadDueInputs(db, now, siteIds, compressorId), now).sort(byUrgency);
}

/** Worst status per compressor (board and kiosk tiles). */
export function serviceBadges(list: readonly ServiceDueDto[]): Map<number, ServiceBadge> {
  const out = new Map<number, ServiceBadge>();
  for (const d of list) {
    const b = out.get(d.compressorId) ?? { status: "ok", overdue: 0, due: 0 };
    if (d.status === "overdue") b.overdue++;
    if (d.status === "due") b.due++;
    b.status = b.overdue > 0 ? "overdue" : b.due > 0 ? "due" : "ok";
    out.set(d.compressorId, b);
  }
  return out;
}

// ---------------------------------------------------------------- log

export type NewServiceLog = {
  compressorId: number;
  siteId: number;
  doneAt: number;
  hourMeterH: number | null;
  tasks: { code: string; name: string }[];
  parts: string;
  notes: string;
  performedBy: number;
  performedByName: string;
  submissionId: string;
};

export function findBySubmission(db: Db, submissionId: string) {
  return db.select().from(serviceLog).where(eq(serviceLog.submissionId, submissionId)).get() ?? null;
}

export function insertServiceLog(db: Db, e: NewServiceLog, now = Date.now()) {
  return db.insert(serviceLog).values({ ...e, createdAt: now }).returning().get();
}

export function getServiceLog(db: Db, id: number) {
  return db.select().from(serviceLog).where(eq(serviceLog.id, id)).get() ?? null;
}

export function updateServiceLog(
  db: Db,
  id: number,
  v: Pick<NewServiceLog, "doneAt" | "hourMeterH" | "tasks" | "parts" | "notes">,
  by: number,
  now = Date.now(),
) {
  return db.update(serviceLog).set({ ...v, correctedAt: now, correctedBy: by }).where(eq(serviceLog.id, id)).returning().get() ?? null;
}

/** The hour meter a compressor reported at (or just before) `at`: hourly rollups, then the last known state. */
export function hourMeterAt(db: Db, compressorId: number, at: number): number | null {
  const row = db.$client
    .prepare(`SELECT hour_meter_h FROM readings_1m WHERE compressor_id = ? AND bucket_ts <= ? AND hour_meter_h IS NOT NULL ORDER BY bucket_ts DESC LIMIT 1`)
    .raw()
    .get(compressorId, at) as [number] | undefined;
  if (row) return row[0];
  const hourly = db.$client
    .prepare(`SELECT hour_meter_h FROM readings_1h WHERE compressor_id = ? AND bucket_ts <= ? AND hour_meter_h IS NOT NULL ORDER BY bucket_ts DESC LIMIT 1`)
    .raw()
    .get(compressorId, at) as [number] | undefined;
  return hourly ? hourly[0] : null;
}

export function listServiceLog(
  db: Db,
  q: { siteIds: readonly number[] | null; site?: number; compressor?: number; q?: string; limit: number },
): ServiceLogDto[] {
  const conds = [];
  if (q.siteIds !== null) conds.push(inArray(serviceLog.siteId, [...q.siteIds]));
  if (q.site) conds.push(eq(serviceLog.siteId, q.site));
  if (q.compressor) conds.push(eq(serviceLog.compressorId, q.compressor));
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    conds.push(
      sql`(${serviceLog.notes} LIKE ${like} ESCAPE '\\' OR ${serviceLog.parts} LIKE ${like} ESCAPE '\\' OR ${serviceLog.tasks} LIKE ${like} ESCAPE '\\' OR ${serviceLog.performedByName} LIKE ${like} ESCAPE '\\')`,
    );
  }
  const rows = db
    .select({
      id: serviceLog.id,
      compressorId: serviceLog.compressorId,
      compressorName: compressors.name,
      siteId: serviceLog.siteId,
      siteName: sites.name,
      timeZone: sites.timeZone,
      doneAt: serviceLog.doneAt,
      hourMeterH: serviceLog.hourMeterH,
      tasks: serviceLog.tasks,
      parts: serviceLog.parts,
      notes: serviceLog.notes,
      performedByName: serviceLog.performedByName,
      createdAt: serviceLog.createdAt,
      correctedAt: serviceLog.correctedAt,
    })
    .from(serviceLog)
    .innerJoin(compressors, eq(compressors.id, serviceLog.compressorId))
    .innerJoin(sites, eq(sites.id, serviceLog.siteId))
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(serviceLog.doneAt), desc(serviceLog.id))
    .limit(q.limit)
    .all();
  const files = listAttachments(
    db,
    "service_log",
    rows.map((r) => r.id),
  );
  return rows.map((r) => ({ ...r, attachments: files.filter((f) => f.ownerId === r.id).map(attachmentDto) }));
}

// ---------------------------------------------------------------- planned service windows

/** An existing window of the compressor that overlaps [startAt, endAt). */
export function overlappingWindow(db: Db, compressorId: number, startAt: number, endAt: number) {
  return (
    db
      .select()
      .from(serviceWindows)
      .where(and(eq(serviceWindows.compressorId, compressorId), lt(serviceWindows.startAt, endAt), gt(serviceWindows.endAt, startAt)))
      .get() ?? null
  );
}

/**
 * Records the window and its start and end in the event log (kind "service", actions service.planned_start and
 * service.planned_end), which is where the monthly report reads planned service (db/reports.ts).
 */
export function insertServiceWindow(
  db: Db,
  w: { compressorId: number; siteId: number; compressorName: string; startAt: number; endAt: number; reason: string; createdBy: number; actor: string },
  now = Date.now(),
) {
  const row = db
    .insert(serviceWindows)
    .values({ compressorId: w.compressorId, siteId: w.siteId, startAt: w.startAt, endAt: w.endAt, reason: w.reason, createdBy: w.createdBy, createdAt: now })
    .returning()
    .get();
  const common = { kind: "service", siteId: w.siteId, compressorId: w.compressorId, actor: w.actor, details: { windowId: row.id, reason: w.reason } };
  appendEvent(db, { ...common, ts: w.startAt, action: PLANNED_START, text: `${w.compressorName}: planned service begins (${w.reason}), entered by ${w.actor}` });
  appendEvent(db, { ...common, ts: w.endAt, action: PLANNED_END, text: `${w.compressorName}: planned service ends (${w.reason})` });
  return row;
}

export function listServiceWindows(db: Db, q: { siteIds: readonly number[] | null; compressor?: number; since: number; limit: number }): ServiceWindowDto[] {
  const conds = [gt(serviceWindows.endAt, q.since)];
  if (q.siteIds !== null) conds.push(inArray(serviceWindows.siteId, [...q.siteIds]));
  if (q.compressor) conds.push(eq(serviceWindows.compressorId, q.compressor));
  return db
    .select({
      id: serviceWindows.id,
      compressorId: serviceWindows.compressorId,
      compressorName: compressors.name,
      siteId: serviceWindows.siteId,
      timeZone: sites.timeZone,
      startAt: serviceWindows.startAt,
      endAt: serviceWindows.endAt,
      reason: serviceWindows.reason,
      createdAt: serviceWindows.createdAt,
    })
    .from(serviceWindows)
    .innerJoin(compressors, eq(compressors.id, serviceWindows.compressorId))
    .innerJoin(sites, eq(sites.id, serviceWindows.siteId))
    .where(and(...conds))
    .orderBy(serviceWindows.startAt)
    .limit(q.limit)
    .all();
}

/**
 * Entries recorded without an hour meter take the one the compressor reported at that time, once telemetry for it
 * has arrived (a late gateway, the demo's backfill). One statement; entries with no telemetry before them stay empty.
 */
export function fillHourMetersFromTelemetry(db: Db): number {
  const at = `(SELECT h.hour_meter_h FROM readings_1h h WHERE h.compressor_id = service_log.compressor_id AND h.bucket_ts <= service_log.done_at
                 AND h.bucket_ts > service_log.done_at - 7 * 86400000 AND h.hour_meter_h IS NOT NULL ORDER BY h.bucket_ts DESC LIMIT 1)`;
  return db.$client.prepare(`UPDATE service_log SET hour_meter_h = ${at} WHERE hour_meter_h IS NULL AND ${at} IS NOT NULL`).run().changes;
}
