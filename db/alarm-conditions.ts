/**
 * The entry point for condition alarms: any part of Airkeep that judges a state of affairs (a service task overdue, an
 * air test failed, a purifier cartridge near its end) raises and clears its alarms here. They take the same ISA-18.2
 * lifecycle as limit alarms (db/alarm-transitions.ts), the same alarms table, event-log entries and e-mail (the mail
 * process's notifier reads the alarms table), and acknowledge, shelve and out-of-service work on them as on any alarm.
 * The alarm engine never clears them: only their caller knows when the condition has gone.
 *
 * Each call runs in one IMMEDIATE transaction (a savepoint inside the caller's) and does nothing when the alarm is
 * already as asked, so callers may repeat themselves freely (e.g. on every sweep).
 */
import { and, eq, like, ne } from "drizzle-orm";
import type { Db } from "@/db/client";
import { alarms, compressors } from "@/db/schema";
import { conditionKey, parseConditionKey } from "@/shared/alarm-conditions";
import type { Priority } from "@/shared/alarm-rules";
import { applyClear, applyRaise, findOpenAlarm, type AlarmTransition, type UnitRef } from "./alarm-transitions";

export type ConditionAlarm = {
  compressorId: number;
  /** A family named in shared/alarm-conditions.ts, e.g. "service-overdue". */
  family: string;
  /** What the condition is about within the family, e.g. a task code: lower-case letters, digits, "-" and "_". */
  subject: string;
  priority: Priority;
  /** When the condition began (ms); defaults to now. */
  ts?: number;
  /** A few words for the event log and e-mail: "due at 4,000 h or by 14 Mar 2027; now 4,012 h". */
  detail?: string;
  value?: number | null;
  /** The threshold the value was judged against, kept with the alarm (e.g. a share of rated delivery). */
  limitValue?: number | null;
};

function unitRef(db: Db, compressorId: number): UnitRef | null {
  return db.select({ id: compressors.id, siteId: compressors.siteId, name: compressors.name }).from(compressors).where(eq(compressors.id, compressorId)).get() ?? null;
}

function immediate<T>(db: Db, fn: () => T): T {
  return db.$client.transaction(fn).immediate();
}

/** Raises the alarm unless it is already active (in whatever state: acknowledged, shelved…); returns the transition made. */
export function raiseConditionAlarm(db: Db, c: ConditionAlarm, now = Date.now()): AlarmTransition | null {
  const key = conditionKey(c.family, c.subject);
  return immediate(db, () => {
    const u = unitRef(db, c.compressorId);
    if (!u) return null;
    const open = findOpenAlarm(db, u.id, key);
    if (open?.active) return null;
    const limit = c.limitValue == null ? null : { value: c.limitValue };
    return applyRaise(db, u, { key, priority: c.priority, ts: c.ts ?? now, value: c.value ?? null, limit, detail: c.detail ?? null }, now);
  });
}

/** Clears the alarm if it is active; an unacknowledged one stays as cleared-unacknowledged, as ISA-18.2 has it. */
export function clearConditionAlarm(
  db: Db,
  c: Pick<ConditionAlarm, "compressorId" | "family" | "subject" | "ts" | "detail" | "value">,
  now = Date.now(),
): AlarmTransition | null {
  const key = conditionKey(c.family, c.subject);
  return immediate(db, () => {
    const u = unitRef(db, c.compressorId);
    if (!u) return null;
    const open = findOpenAlarm(db, u.id, key);
    if (!open?.active) return null;
    return applyClear(db, u, { key, priority: open.priority, ts: c.ts ?? now, value: c.value ?? null, limit: null, tripCode: null, detail: c.detail ?? null }, now);
  });
}

/**
 * Makes one family's alarms on one compressor match what is wanted now: raises each wanted subject not yet active,
 * clears each active one no longer wanted. For a sweep that judges all of a family's conditions at once.
 */
export function syncConditionAlarms(
  db: Db,
  compressorId: number,
  family: string,
  wanted: readonly Omit<ConditionAlarm, "compressorId" | "family">[],
  now = Date.now(),
  clearDetail?: string,
): AlarmTransition[] {
  return immediate(db, () => {
    const out: AlarmTransition[] = [];
    const want = new Set(wanted.map((w) => w.subject));
    const open = db
      .select({ key: alarms.key, active: alarms.active })
      .from(alarms)
      .where(and(eq(alarms.compressorId, compressorId), ne(alarms.state, "normal"), like(alarms.key, `cond:${family}:%`)))
      .all();
    for (const row of open) {
      const c = parseConditionKey(row.key);
      if (!c || c.family !== family || !row.active || want.has(c.subject)) continue;
      const t = clearConditionAlarm(db, { compressorId, family, subject: c.subject, detail: clearDetail }, now);
      if (t) out.push(t);
    }
    for (const w of wanted) {
      const t = raiseConditionAlarm(db, { ...w, compressorId, family }, now);
      if (t) out.push(t);
    }
    return out;
  });
}
