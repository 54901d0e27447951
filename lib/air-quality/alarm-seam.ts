/**
 * Where air-quality code raises and clears its alarms (failed or overdue test, cartridge use): condition alarms of the
 * family "air-quality" (db/alarm-conditions.ts), on the same ISA-18.2 lifecycle, events and e-mail as limit alarms.
 */
import type { Db } from "@/db/client";
import { clearConditionAlarm, raiseConditionAlarm } from "@/db/alarm-conditions";
import { AIR_ALARM_FAMILY, airAlarmPriority, type AirAlarmKind } from "@/shared/air-quality-alarms";

export type AirAlarmChange = { kind: AirAlarmKind; action: "raise" | "clear"; alarmId: number };

/** Raise or clear as the condition says; null when the alarm already is as asked. `detail` goes into the event and e-mail. */
export function setAirAlarm(db: Db, unit: { id: number }, kind: AirAlarmKind, active: boolean, ts: number, detail = "", value: number | null = null): AirAlarmChange | null {
  const c = { compressorId: unit.id, family: AIR_ALARM_FAMILY, subject: kind, ts, detail: detail || undefined };
  const t = active ? raiseConditionAlarm(db, { ...c, priority: airAlarmPriority[kind], value }, Date.now()) : clearConditionAlarm(db, c, Date.now());
  return t ? { kind, action: active ? "raise" : "clear", alarmId: t.alarmId } : null;
}
