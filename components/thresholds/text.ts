import { signalInfo } from "@/shared/alarm-rules";
import { formatDeadband, formatValue, type ThresholdRow } from "@/shared/threshold-schema";
import type { UnitPreference } from "@/shared/units";
import { priorityWord } from "./priority-mark";

/** "Final-stage temperature high warning". */
export function lineLabel(l: Pick<ThresholdRow, "signal" | "direction" | "priority">): string {
  return `${signalInfo[l.signal].label} ${l.direction} ${priorityWord[l.priority].toLowerCase()}`;
}

/** A row as one line of text in the person's units: "160 °C, deadband 5 °C, on 10 s, off 30 s". */
export function rowText(r: ThresholdRow, units: UnitPreference): string {
  if (!r.enabled) return "switched off";
  return `${formatValue(r.signal, r.value, units)}, deadband ${formatDeadband(r.signal, r.deadband, units)}, on ${r.onDelayS} s, off ${r.offDelayS} s`;
}
