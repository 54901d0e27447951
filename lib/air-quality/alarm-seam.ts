/**
 * The one place air-quality code raises and clears its condition alarms (failed or overdue test, cartridge use).
 * A thin seam over the alarm engine's ISA-18.2 transitions; the mail process notifies from the alarms table as usual.
 * Runs inside the caller's IMMEDIATE transaction.
 */
import type { Db } from "@/db/client";
import { appendEvent } from "@/db/events";
import { applyClear, applyRaise, findOpenAlarm, type UnitRef } from "@/lib/alarms/transitions";
import { airAlarmPriority, type AirAlarmKind } from "@/shared/air-quality-alarms";

export type AirAlarmChange = { kind: AirAlarmKind; action: "raise" | "clear"; alarmId: number };

/** Raises the alarm unless one is already open and active; `detail` goes to the event log beside the standard sentence. */
export function raiseAirAlarm(db: Db, unit: UnitRef, kind: AirAlarmKind, ts: number, detail: string, value: number | null = null): AirAlarmChange | null {
  const open = findOpenAlarm(db, unit.id, kind);
  if (open?.active) return null;
  const t = applyRaise(db, unit, { key: kind, priority: airAlarmPriority[kind], ts, value, limit: null, tripCode: null, chattering: false }, Date.now());
  if (detail) appendEvent(db, { ts, kind: "air-test", action: "air.alarm_detail", text: `${unit.name}: ${detail}`, priority: airAlarmPriority[kind], siteId: unit.siteId, compressorId: unit.id, alarmId: t.alarmId });
  return { kind, action: "raise", alarmId: t.alarmId };
}

export function clearAirAlarm(db: Db, unit: UnitRef, kind: AirAlarmKind, ts: number): AirAlarmChange | null {
  const open = findOpenAlarm(db, unit.id, kind);
  if (!open?.active) return null;
  const t = applyClear(db, unit, { key: kind, priority: airAlarmPriority[kind], ts, value: null, limit: null, tripCode: null }, Date.now());
  return t ? { kind, action: "clear", alarmId: t.alarmId } : null;
}

/** Raise or clear as the condition says. */
export function setAirAlarm(db: Db, unit: UnitRef, kind: AirAlarmKind, active: boolean, ts: number, detail = ""): AirAlarmChange | null {
  return active ? raiseAirAlarm(db, unit, kind, ts, detail) : clearAirAlarm(db, unit, kind, ts);
}
