/**
 * Alarms for the web app: the lists and the operator's transitions (acknowledge, shelve, out of service, return to
 * service). Each transition is checked against the ISA-18.2 lifecycle (shared/alarm-lifecycle.ts) and the person's site
 * scope, and written with its event-log entry in one transaction.
 */
import { and, desc, eq, inArray, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import { nextAlarmState, type AlarmInput, type AlarmState } from "@/shared/alarm-lifecycle";
import type { Priority } from "@/shared/alarm-rules";
import { acknowledgeSchema, shelveSchema, type AlarmDto } from "@/shared/alarm-schema";
import {
  acknowledgeSentence,
  alarmTitle,
  outOfServiceSentence,
  returnToServiceSentence,
  shelveSentence,
} from "@/shared/alarm-text";
import type { Db } from "./client";
import { appendEvent } from "./events";
import { alarms, compressors, sites, users } from "./schema";

export type AlarmListFilter = {
  /** null means every site. */
  siteIds: number[] | null;
  states?: AlarmState[];
  priority?: Priority;
  compressorId?: number;
  /** With no states given: include alarms that have returned to normal (history). Default false. */
  includeNormal?: boolean;
  /** Default 500. */
  limit?: number;
};

export type AlarmActionResult = { done: number[]; refused: { id: number; reason: string }[] };

const ackUser = alias(users, "ack_user");

const dtoColumns = {
  id: alarms.id,
  compressorId: alarms.compressorId,
  compressorName: compressors.name,
  siteId: alarms.siteId,
  siteName: sites.name,
  timeZone: sites.timeZone,
  key: alarms.key,
  priority: alarms.priority,
  signal: alarms.signal,
  state: alarms.state,
  active: alarms.active,
  raisedAt: alarms.raisedAt,
  clearedAt: alarms.clearedAt,
  value: alarms.value,
  limitValue: alarms.limitValue,
  tripCode: alarms.tripCode,
  chattering: alarms.chattering,
  ackAt: alarms.ackAt,
  ackByName: ackUser.name,
  ackComment: alarms.ackComment,
  shelvedUntil: alarms.shelvedUntil,
  shelveComment: alarms.shelveComment,
  outOfServiceReason: alarms.outOfServiceReason,
};

type DtoRow = Omit<AlarmDto, "title">;

function toDto(r: DtoRow): AlarmDto {
  return { ...r, title: alarmTitle(r) };
}

function dtoQuery(db: Db, where: SQL | undefined) {
  return db
    .select(dtoColumns)
    .from(alarms)
    .innerJoin(compressors, eq(compressors.id, alarms.compressorId))
    .innerJoin(sites, eq(sites.id, alarms.siteId))
    .leftJoin(ackUser, eq(ackUser.id, alarms.ackBy))
    .where(where);
}

const priorityOrder = sql`case ${alarms.priority} when 'critical' then 0 when 'warning' then 1 else 2 end`;

/** Alarms sorted by priority (critical first), then newest first. */
export function listAlarms(db: Db, f: AlarmListFilter): AlarmDto[] {
  if (f.siteIds && f.siteIds.length === 0) return [];
  const conds: SQL[] = [];
  if (f.siteIds) conds.push(inArray(alarms.siteId, f.siteIds));
  if (f.states && f.states.length > 0) conds.push(inArray(alarms.state, f.states));
  else if (!f.includeNormal) conds.push(sql`${alarms.state} <> 'normal'`);
  if (f.priority) conds.push(eq(alarms.priority, f.priority));
  if (f.compressorId !== undefined) conds.push(eq(alarms.compressorId, f.compressorId));
  return dtoQuery(db, conds.length ? and(...conds) : undefined)
    .orderBy(priorityOrder, desc(alarms.raisedAt), desc(alarms.id))
    .limit(Math.max(1, Math.min(f.limit ?? 500, 5000)))
    .all()
    .map(toDto);
}

/** One alarm, whatever its site (the caller checks scope). */
export function getAlarm(db: Db, id: number): AlarmDto | null {
  const row = dtoQuery(db, eq(alarms.id, id)).get();
  return row ? toDto(row) : null;
}

/** Alarms with the condition present and annunciated (active, acknowledged or not), per compressor and priority. */
export function activeAlarmCounts(
  db: Db,
  siteIds: number[] | null,
): Map<number, { critical: number; warning: number; advisory: number }> {
  const out = new Map<number, { critical: number; warning: number; advisory: number }>();
  if (siteIds && siteIds.length === 0) return out;
  const conds: SQL[] = [inArray(alarms.state, ["active-unacknowledged", "active-acknowledged"])];
  if (siteIds) conds.push(inArray(alarms.siteId, siteIds));
  const rows = db
    .select({ compressorId: alarms.compressorId, priority: alarms.priority, n: sql<number>`count(*)` })
    .from(alarms)
    .where(and(...conds))
    .groupBy(alarms.compressorId, alarms.priority)
    .all();
  for (const r of rows) {
    let c = out.get(r.compressorId);
    if (!c) out.set(r.compressorId, (c = { critical: 0, warning: 0, advisory: 0 }));
    c[r.priority] = r.n;
  }
  return out;
}

// ——— operator transitions ———

const notApplicable: Record<AlarmInput["type"], Partial<Record<AlarmState, string>>> = {
  acknowledge: {
    "active-acknowledged": "Already acknowledged",
    normal: "Already back to normal",
    shelved: "Shelved: it is announced again when the shelving ends",
    suppressed: "Suppressed by design while the unit is stopped or settling",
    "out-of-service": "Out of service",
  },
  shelve: {
    normal: "Already back to normal: nothing to shelve",
    suppressed: "Suppressed by design while the unit is stopped or settling",
    "out-of-service": "Out of service",
  },
  "remove-from-service": {
    normal: "Already back to normal",
    "out-of-service": "Already out of service",
  },
  "return-to-service": {},
  activate: {},
  clear: {},
  unshelve: {},
  suppress: {},
  unsuppress: {},
};

type Scoped = { siteIds: number[] | null; userId: number; actor: string; now?: number };

/**
 * Loads each alarm, checks existence, scope and the lifecycle, and applies `change` to the ones that qualify, all in
 * one immediate transaction (the alarm engine writes the same rows from another process).
 */
function transition(
  db: Db,
  ids: readonly number[],
  siteIds: number[] | null,
  input: (row: typeof alarms.$inferSelect) => AlarmInput,
  extraRefusal: (row: typeof alarms.$inferSelect) => string | null,
  change: (row: typeof alarms.$inferSelect & { compressorName: string }, to: AlarmState) => void,
): AlarmActionResult {
  const result: AlarmActionResult = { done: [], refused: [] };
  const run = db.$client.transaction(() => {
    for (const id of [...new Set(ids)]) {
      const row = db
        .select({ a: alarms, compressorName: compressors.name })
        .from(alarms)
        .innerJoin(compressors, eq(compressors.id, alarms.compressorId))
        .where(eq(alarms.id, id))
        .get();
      if (!row) {
        result.refused.push({ id, reason: "No such alarm" });
        continue;
      }
      if (siteIds && !siteIds.includes(row.a.siteId)) {
        result.refused.push({ id, reason: "No such alarm" });
        continue;
      }
      const extra = extraRefusal(row.a);
      if (extra) {
        result.refused.push({ id, reason: extra });
        continue;
      }
      const inp = input(row.a);
      const to = nextAlarmState(row.a.state, inp);
      if (!to) {
        result.refused.push({ id, reason: notApplicable[inp.type][row.a.state] ?? "Does not apply in this state" });
        continue;
      }
      change({ ...row.a, compressorName: row.compressorName }, to);
      result.done.push(id);
    }
  });
  run.immediate();
  return result;
}

function invalid(ids: readonly number[], reason: string): AlarmActionResult {
  return { done: [], refused: [...new Set(ids)].map((id) => ({ id, reason })) };
}

export function acknowledgeAlarms(db: Db, p: Scoped & { ids: number[]; comment?: string }): AlarmActionResult {
  const c = acknowledgeSchema.shape.comment.safeParse(p.comment);
  if (!c.success) return invalid(p.ids, c.error.issues[0]?.message ?? "Invalid comment");
  const comment = c.data;
  const now = p.now ?? Date.now();
  return transition(
    db,
    p.ids,
    p.siteIds,
    () => ({ type: "acknowledge" }),
    () => null,
    (row, to) => {
      db.update(alarms)
        .set({ state: to, ackAt: now, ackBy: p.userId, ackComment: comment || null, updatedAt: now })
        .where(eq(alarms.id, row.id))
        .run();
      appendEvent(db, {
        ts: now,
        kind: "acknowledge",
        action: "alarm.acknowledge",
        text: acknowledgeSentence({ ...row, actor: p.actor, comment }),
        priority: row.priority,
        siteId: row.siteId,
        compressorId: row.compressorId,
        alarmId: row.id,
        actor: p.actor,
        details: { key: row.key, from: row.state, to, comment },
      });
    },
  );
}

export function shelveAlarms(db: Db, p: Scoped & { ids: number[]; comment: string; minutes: number }): AlarmActionResult {
  const c = shelveSchema.shape.comment.safeParse(p.comment);
  if (!c.success) return invalid(p.ids, c.error.issues[0]?.message ?? "Invalid comment");
  const m = shelveSchema.shape.minutes.safeParse(p.minutes);
  if (!m.success) return invalid(p.ids, m.error.issues[0]?.message ?? "Invalid duration");
  const comment = c.data;
  const minutes = m.data;
  const now = p.now ?? Date.now();
  const until = now + minutes * 60_000;
  return transition(
    db,
    p.ids,
    p.siteIds,
    () => ({ type: "shelve" }),
    // A closed row is history: re-opening it could collide with a newer occurrence of the same alarm.
    (row) => (row.state === "normal" ? notApplicable.shelve.normal! : null),
    (row, to) => {
      db.update(alarms)
        .set({ state: to, shelvedUntil: until, shelvedBy: p.userId, shelveComment: comment, updatedAt: now })
        .where(eq(alarms.id, row.id))
        .run();
      appendEvent(db, {
        ts: now,
        kind: "shelve",
        action: "alarm.shelve",
        text: shelveSentence({ ...row, actor: p.actor, comment, minutes }),
        priority: row.priority,
        siteId: row.siteId,
        compressorId: row.compressorId,
        alarmId: row.id,
        actor: p.actor,
        details: { key: row.key, from: row.state, to, comment, minutes, shelvedUntil: until },
      });
    },
  );
}

export function setOutOfService(db: Db, p: Scoped & { id: number; reason: string }): AlarmActionResult {
  const c = acknowledgeSchema.shape.comment.safeParse(p.reason);
  if (!c.success) return invalid([p.id], c.error.issues[0]?.message ?? "Invalid reason");
  const reason = c.data;
  const now = p.now ?? Date.now();
  return transition(
    db,
    [p.id],
    p.siteIds,
    () => ({ type: "remove-from-service" }),
    (row) => notApplicable["remove-from-service"][row.state] ?? null,
    (row, to) => {
      db.update(alarms).set({ state: to, outOfServiceReason: reason, updatedAt: now }).where(eq(alarms.id, row.id)).run();
      appendEvent(db, {
        ts: now,
        kind: "alarm",
        action: "alarm.out_of_service",
        text: outOfServiceSentence({ ...row, actor: p.actor, reason }),
        priority: row.priority,
        siteId: row.siteId,
        compressorId: row.compressorId,
        alarmId: row.id,
        actor: p.actor,
        details: { key: row.key, from: row.state, to, reason },
      });
    },
  );
}

export function returnToService(db: Db, p: Scoped & { id: number; comment: string }): AlarmActionResult {
  const c = acknowledgeSchema.shape.comment.safeParse(p.comment);
  if (!c.success) return invalid([p.id], c.error.issues[0]?.message ?? "Invalid comment");
  const comment = c.data;
  const now = p.now ?? Date.now();
  return transition(
    db,
    [p.id],
    p.siteIds,
    (row) => ({ type: "return-to-service", active: row.active }),
    (row) => (row.state === "out-of-service" ? null : "Not out of service"),
    (row, to) => {
      db.update(alarms)
        .set({
          state: to,
          outOfServiceReason: null,
          updatedAt: now,
          ...(to === "active-unacknowledged" ? { ackAt: null, ackBy: null, ackComment: null, reAlarmedAt: null } : {}),
        })
        .where(eq(alarms.id, row.id))
        .run();
      appendEvent(db, {
        ts: now,
        kind: "alarm",
        action: "alarm.return_to_service",
        text: returnToServiceSentence({ ...row, actor: p.actor, comment, active: row.active }),
        priority: row.priority,
        siteId: row.siteId,
        compressorId: row.compressorId,
        alarmId: row.id,
        actor: p.actor,
        details: { key: row.key, from: row.state, to, comment },
      });
    },
  );
}
