/** Alarms Airkeep raises from air-quality records and cartridge use (not from a reading crossing a limit). */
import type { Priority } from "./alarm-rules";
import { cautions } from "./safety";

/** Condition-alarm family (shared/alarm-conditions.ts); the kinds below are its subjects. */
export const AIR_ALARM_FAMILY = "air-quality";
export const airAlarmKey = (kind: AirAlarmKind) => `cond:${AIR_ALARM_FAMILY}:${kind}`;

export const airAlarmKinds = ["air-test-failed", "air-test-overdue", "cartridge-advisory", "cartridge-spent"] as const;
export type AirAlarmKind = (typeof airAlarmKinds)[number];

export const airAlarmPriority: Record<AirAlarmKind, Priority> = {
  "air-test-failed": "critical",
  "air-test-overdue": "warning",
  "cartridge-advisory": "advisory",
  "cartridge-spent": "warning",
};

export const airAlarmTitles: Record<AirAlarmKind, string> = {
  "air-test-failed": "Air test failed",
  "air-test-overdue": "Air test overdue",
  "cartridge-advisory": "Purifier cartridge near end",
  "cartridge-spent": "Purifier cartridge spent",
};

export const DO_NOT_USE_AIR = "Do not use air from this compressor until it has been retested and passed.";
export const SPENT_CARTRIDGE_CAUTION =
  "A spent purifier cartridge passes wet air that can freeze regulators and corrode cylinders; change it before filling.";

export function isAirAlarmKind(subject: string): subject is AirAlarmKind {
  return (airAlarmKinds as readonly string[]).includes(subject);
}

/** The kind of an alarm key "cond:air-quality:<kind>", or null. */
export function airAlarmKindOf(key: string): AirAlarmKind | null {
  const prefix = `cond:${AIR_ALARM_FAMILY}:`;
  const k = key.startsWith(prefix) ? key.slice(prefix.length) : "";
  return isAirAlarmKind(k) ? k : null;
}

/** The trade's cautions shown with each of these alarms. */
export function airAlarmCautions(kind: AirAlarmKind): string[] {
  switch (kind) {
    case "air-test-failed":
      return [DO_NOT_USE_AIR, cautions.intakeCo, cautions.hotStage, cautions.oilCarryOver, cautions.spentCartridge];
    case "air-test-overdue":
      return ["Breathing air must be tested at the interval your standard and local regulations require."];
    case "cartridge-advisory":
    case "cartridge-spent":
      return [SPENT_CARTRIDGE_CAUTION];
  }
}
