/**
 * The alarm rows and event-log entries the engine writes, one ISA-18.2 transition at a time. Every function here runs
 * inside the caller's transaction and reads the row it changes first (the web app changes states too: acknowledge,
 * shelve, out of service), so the stored state, never a cached one, decides the next state.
 */
import { and, eq, ne } from "drizzle-orm";
import type { Db } from "@/db/client";
import { appendEvent } from "@/db/events";
import { alarms, type AlarmRow } from "@/db/schema";
import type { AlarmEvent } from "@/shared/alarm-eval";
import { nextAlarmState, type AlarmState } from "@/shared/alarm-lifecycle";
import type { Limit, Priority } from "@/shared/alarm-rules";
import {
  clearSentence,
  COMMS_ALARM_KEY,
  raiseSentence,
  reAlarmSentence,
  suppressSentence,
  TRIP_ALARM_KEY,
  unshelveSentence,
  unsuppressSentence,
} from "@/shared/alarm-text";
import type { RunState } from "@/shared/telemetry";

export type AlarmAction =
  | "alarm.raise"
  | "alarm.clear"
  | "alarm.suppress"
  | "alarm.unsuppress"
  | "alarm.unshelve"
  | "alarm.re_alarm";

/** One change the engine made, as written to the alarms table and the event log. */
export type AlarmTransition = {
  alarmId: number;
  eventId: number;
  compressorId: number;
  siteId: number;
  key: string;
  priority: Priority;
  action: AlarmAction;
  /** "normal" for a newly raised alarm. */
  from: AlarmState;
  to: AlarmState;
  active: boolean;
  ts: number;
  text: string;
};

export type UnitRef = { id: number; siteId: number; name: string };

/** Event-log kind of an alarm's own transitions. */
export function eventKindFor(key: string): string {
  return key === TRIP_ALARM_KEY ? "trip" : key === COMMS_ALARM_KEY ? "comms" : "alarm";
}

export function findOpenAlarm(db: Db, compressorId: number, key: string): AlarmRow | undefined {
  return db
    .select()
    .from(alarms)
    .where(and(eq(alarms.compressorId, compressorId), eq(alarms.key, key), ne(alarms.state, "normal")))
    .get();
}

function record(
  db: Db,
  u: UnitRef,
  a: { id: number; key: string; priority: Priority },
  action: AlarmAction,
  from: AlarmState,
  to: AlarmState,
  active: boolean,
  ts: number,
  text: string,
  kind: string,
  details: Record<string, unknown>,
): AlarmTransition {
  const eventId = appendEvent(db, {
    ts,
    kind,
    action,
    text,
    priority: a.priority,
    siteId: u.siteId,
    compressorId: u.id,
    alarmId: a.id,
    details: { key: a.key, from, to, ...details },
  });
  return { alarmId: a.id, eventId, compressorId: u.id, siteId: u.siteId, key: a.key, priority: a.priority, action, from, to, active, ts, text };
}

/**
 * Fields reset when an alarm is announced afresh as unacknowledged (it must be acknowledged again). The notifier's own
 * columns (notified_at, escalation_level) are left to the notifier.
 */
const announceAfresh = { ackAt: null, ackBy: null, ackComment: null, reAlarmedAt: null } as const;

/** raise: a new row (active, unacknowledged) or the open row re-activated / held as its state says. */
/** The part of a limit an alarm row keeps; a condition alarm has a threshold value and no signal. */
type RaisedLimit = { value: number; signal?: Limit["signal"] } | null;

export function applyRaise(
  db: Db,
  u: UnitRef,
  e: Pick<AlarmEvent, "key" | "priority" | "ts" | "value" | "tripCode" | "chattering"> & { limit: RaisedLimit; detail?: string | null },
  updatedAt: number,
): AlarmTransition {
  const row = findOpenAlarm(db, u.id, e.key);
  const isTrip = e.key === TRIP_ALARM_KEY;
  const limitValue = e.limit?.value ?? null;
  const tripCode = isTrip ? (e.tripCode ?? null) : null;
  const chattering = e.chattering === true;
  let id: number;
  let from: AlarmState = "normal";
  let to: AlarmState = "active-unacknowledged";
  if (!row) {
    id = db
      .insert(alarms)
      .values({
        compressorId: u.id,
        siteId: u.siteId,
        key: e.key,
        priority: e.priority,
        signal: e.limit?.signal ?? null,
        state: to,
        active: true,
        raisedAt: e.ts,
        value: e.value,
        limitValue,
        tripCode,
        chattering,
        updatedAt,
      })
      .returning({ id: alarms.id })
      .get().id;
  } else {
    id = row.id;
    from = row.state;
    // The evaluator raises only once designed suppression is over, so a suppressed alarm comes back as unsuppressed.
    to = (from === "suppressed" ? nextAlarmState(from, { type: "unsuppress", active: true }) : nextAlarmState(from, { type: "activate" })) ?? from;
    const announce = to === "active-unacknowledged" && from !== to;
    db.update(alarms)
      .set({
        state: to,
        active: true,
        clearedAt: null,
        value: e.value ?? row.value,
        limitValue: limitValue ?? row.limitValue,
        tripCode: isTrip ? tripCode : row.tripCode,
        chattering: row.chattering || chattering,
        updatedAt,
        ...(announce ? { raisedAt: e.ts, ...announceAfresh } : {}),
      })
      .where(eq(alarms.id, id))
      .run();
  }
  const text = raiseSentence({
    key: e.key,
    compressorName: u.name,
    priority: e.priority,
    value: e.value,
    limitValue,
    tripCode,
    chattering,
    state: to,
    detail: e.detail,
  });
  return record(db, u, { id, key: e.key, priority: e.priority }, "alarm.raise", from, to, true, e.ts, text, eventKindFor(e.key), {
    ...(e.detail ? { detail: e.detail } : {}),
    value: e.value,
    limit: limitValue,
    ...(isTrip ? { tripCode } : {}),
    ...(chattering ? { chattering } : {}),
  });
}

/** clear: the condition returned (or its limit was removed); null when no alarm is open for the key. */
export function applyClear(
  db: Db,
  u: UnitRef,
  e: Pick<AlarmEvent, "key" | "priority" | "ts" | "value" | "tripCode"> & { limit: RaisedLimit; detail?: string | null },
  updatedAt: number,
  reason: "returned" | "limit-removed" = "returned",
): AlarmTransition | null {
  const row = findOpenAlarm(db, u.id, e.key);
  if (!row) return null;
  const from = row.state;
  const to = nextAlarmState(from, { type: "clear" }) ?? from;
  db.update(alarms).set({ state: to, active: false, clearedAt: e.ts, updatedAt }).where(eq(alarms.id, row.id)).run();
  const text = clearSentence({
    key: row.key,
    compressorName: u.name,
    priority: row.priority,
    value: e.value,
    limitValue: e.limit?.value ?? row.limitValue,
    tripCode: row.tripCode,
    reason,
    detail: e.detail,
  });
  return record(db, u, row, "alarm.clear", from, to, false, e.ts, text, eventKindFor(row.key), {
    ...(e.detail ? { detail: e.detail } : {}),
    value: e.value,
    ...(reason !== "returned" ? { reason } : {}),
  });
}

/** A clear caused by designed suppression (the unit stopped or is settling): the alarm goes to suppressed. */
export function applySuppress(db: Db, u: UnitRef, e: Pick<AlarmEvent, "key" | "ts">, runState: RunState, updatedAt: number): AlarmTransition | null {
  const row = findOpenAlarm(db, u.id, e.key);
  if (!row) return null;
  const from = row.state;
  const to = nextAlarmState(from, { type: "suppress" }) ?? from;
  db.update(alarms).set({ state: to, active: false, clearedAt: e.ts, updatedAt }).where(eq(alarms.id, row.id)).run();
  const text = suppressSentence({ key: row.key, compressorName: u.name, priority: row.priority, tripCode: row.tripCode, runState });
  return record(db, u, row, "alarm.suppress", from, to, false, e.ts, text, "alarm", { runState });
}

/** Designed suppression ended (the unit has run past its settling time): every alarm still suppressed leaves that state. */
export function applyUnsuppressAll(db: Db, u: UnitRef, ts: number, updatedAt: number): AlarmTransition[] {
  const rows = db
    .select()
    .from(alarms)
    .where(and(eq(alarms.compressorId, u.id), eq(alarms.state, "suppressed")))
    .all();
  return rows.map((row) => {
    const to = nextAlarmState("suppressed", { type: "unsuppress", active: row.active }) ?? "normal";
    db.update(alarms)
      .set({ state: to, updatedAt, ...(to === "active-unacknowledged" ? announceAfresh : {}) })
      .where(eq(alarms.id, row.id))
      .run();
    const text = unsuppressSentence({ key: row.key, compressorName: u.name, priority: row.priority, tripCode: row.tripCode, active: row.active });
    return record(db, u, row, "alarm.unsuppress", "suppressed", to, row.active, ts, text, "alarm", {});
  });
}

/** Shelving ran out: back to active-unacknowledged when the condition is present, otherwise normal. */
export function applyUnshelve(db: Db, u: UnitRef, row: AlarmRow, now: number): AlarmTransition | null {
  const to = nextAlarmState(row.state, { type: "unshelve", active: row.active });
  if (!to) return null;
  db.update(alarms)
    .set({ state: to, shelvedUntil: null, updatedAt: now, ...(to === "active-unacknowledged" ? announceAfresh : {}) })
    .where(eq(alarms.id, row.id))
    .run();
  const text = unshelveSentence({ key: row.key, compressorName: u.name, priority: row.priority, tripCode: row.tripCode, active: row.active });
  return record(db, u, row, "alarm.unshelve", row.state, to, row.active, now, text, "shelve", { shelvedUntil: row.shelvedUntil });
}

/** An acknowledged alarm still active after the re-alarm time is announced again as unacknowledged. */
export function applyReAlarm(db: Db, u: UnitRef, row: AlarmRow, now: number): AlarmTransition {
  const from = row.state;
  const to: AlarmState = "active-unacknowledged";
  db.update(alarms)
    .set({ state: to, reAlarmedAt: now, updatedAt: now })
    .where(eq(alarms.id, row.id))
    .run();
  const text = reAlarmSentence({
    key: row.key,
    compressorName: u.name,
    priority: row.priority,
    tripCode: row.tripCode,
    acknowledgedAgoMs: now - (row.ackAt ?? now),
  });
  return record(db, u, row, "alarm.re_alarm", from, to, true, now, text, "alarm", { ackAt: row.ackAt });
}
