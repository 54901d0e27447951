import type { AlarmState } from "@/shared/alarm-lifecycle";
import { alarmSignalSchema, signalInfo } from "@/shared/alarm-rules";
import type { AlarmDto } from "@/shared/alarm-schema";
import { formatPressure, formatTemperature, type UnitPreference } from "@/shared/units";

/** A value of the alarm's signal in the person's unit ("182 °C", "5,221 psi"); "—" when there is none. */
export function alarmQuantity(signal: string | null, value: number | null, units: UnitPreference): string {
  if (value == null) return "—";
  const s = alarmSignalSchema.safeParse(signal);
  if (!s.success) return String(value);
  return signalInfo[s.data].kind === "pressure" ? formatPressure(value, units.pressureUnit) : formatTemperature(value, units.temperatureUnit);
}

/** "182 °C against limit 175 °C", or "" for alarms without a measured value (trips, communication). */
export function valueVsLimit(a: Pick<AlarmDto, "signal" | "value" | "limitValue">, units: UnitPreference): string {
  if (a.value == null && a.limitValue == null) return "";
  const value = alarmQuantity(a.signal, a.value, units);
  return a.limitValue == null ? value : `${value} against limit ${alarmQuantity(a.signal, a.limitValue, units)}`;
}

export type AlarmActionKind = "acknowledge" | "shelve" | "out-of-service" | "return-to-service";

/** Which operator actions apply in a state (the server checks again, with its reasons). */
export function actionApplies(kind: AlarmActionKind, state: AlarmState): boolean {
  switch (kind) {
    case "acknowledge":
      return state === "active-unacknowledged" || state === "cleared-unacknowledged";
    case "shelve":
      return state !== "normal" && state !== "suppressed" && state !== "out-of-service";
    case "out-of-service":
      return state !== "normal" && state !== "out-of-service";
    case "return-to-service":
      return state === "out-of-service";
  }
}

/** "12 min", "3 h 05 min", "2 d 4 h" — how long ago, for an alarm's age. */
export function formatAlarmAge(ms: number): string {
  const s = Math.max(0, Math.floor(ms / 1000));
  if (s < 60) return `${s} s`;
  const min = Math.floor(s / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  if (h < 48) return `${h} h ${String(min % 60).padStart(2, "0")} min`;
  return `${Math.floor(h / 24)} d ${h % 24} h`;
}
