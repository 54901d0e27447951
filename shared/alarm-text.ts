/**
 * The words for alarms, in one place: screens, e-mails and the event log all build their titles and sentences here.
 * Pure; values arrive in stored units (bar, °C) and are written in them (the event log is stored once, for everyone).
 */
import { alarmSignalSchema, signalInfo, type AlarmSignal, type Priority } from "./alarm-rules";
import { stateLabels, type AlarmState } from "./alarm-lifecycle";
import type { RunState } from "./telemetry";
import { tripCodeInfo, tripCodeLabel } from "./trip-codes";

export const TRIP_ALARM_KEY = "trip";
export const COMMS_ALARM_KEY = "comms";

export type AlarmTextInput = {
  key: string;
  signal?: string | null;
  tripCode?: number | null;
};

type ParsedKey = { signal: AlarmSignal; direction: "high" | "low"; priority: Priority } | null;

/** Splits a limit key "signal.direction.priority"; null for "trip", "comms" or anything unknown. */
export function parseLimitKey(key: string): ParsedKey {
  const [signal, direction, priority, extra] = key.split(".");
  if (extra !== undefined || (direction !== "high" && direction !== "low")) return null;
  if (priority !== "critical" && priority !== "warning" && priority !== "advisory") return null;
  const s = alarmSignalSchema.safeParse(signal);
  return s.success ? { signal: s.data, direction, priority } : null;
}

const lowerFirst = (s: string) => s.charAt(0).toLowerCase() + s.slice(1);

/** "Final-stage temperature high", "Trip 110: Final stage over-temperature", "Communication lost". */
export function alarmTitle(a: AlarmTextInput): string {
  if (a.key === TRIP_ALARM_KEY) return a.tripCode != null ? `Trip ${a.tripCode}: ${tripCodeLabel(a.tripCode)}` : "Compressor tripped";
  if (a.key === COMMS_ALARM_KEY) return "Communication lost";
  const s = parseLimitKey(a.key);
  if (!s) return a.key;
  return `${signalInfo[s.signal].label} ${s.direction}`;
}

export function signalUnit(signal: AlarmSignal): string {
  return signalInfo[signal].kind === "pressure" ? "bar" : "°C";
}

/** A reading as written in sentences: oil pressure to 0.01 bar, other pressures and temperatures to 0.1. */
export function formatSignalValue(signal: AlarmSignal, v: number): string {
  const digits = signal === "oilBar" ? 2 : 1;
  return `${v.toFixed(digits)} ${signalUnit(signal)}`;
}

/** A configured limit as written in sentences: no trailing zeros (175 °C, 1.5 bar). */
export function formatLimitValue(signal: AlarmSignal, v: number): string {
  return `${Number(v.toFixed(2))} ${signalUnit(signal)}`;
}

const runStateWords: Record<RunState, string> = {
  stopped: "stopped",
  standby: "in standby",
  starting: "starting",
  running: "settling after a start",
  tripped: "tripped",
};

export type AlarmSentenceInput = AlarmTextInput & {
  compressorName: string;
  priority: Priority;
  value?: number | null;
  limitValue?: number | null;
  deadband?: number | null;
  chattering?: boolean;
  /** The state the alarm was left in, when it is not the plain annunciated one. */
  state?: AlarmState;
};

function heldSuffix(state: AlarmState | undefined): string {
  return state === "shelved" || state === "out-of-service" || state === "suppressed" ? ` (${stateLabels[state].toLowerCase()})` : "";
}

/** "HR-1 Bay compressor: final-stage temperature 182.4 °C above warning limit 175 °C". */
export function raiseSentence(a: AlarmSentenceInput): string {
  const who = a.compressorName;
  if (a.key === TRIP_ALARM_KEY) {
    const info = tripCodeInfo(a.tripCode);
    const code = a.tripCode != null ? ` (code ${a.tripCode}${info ? `, ${info.label}` : ""})` : "";
    const why = info ? `: ${lowerFirst(info.description.replace(/\.$/, ""))}` : "";
    return `${who}: tripped${code}${why}${heldSuffix(a.state)}`;
  }
  if (a.key === COMMS_ALARM_KEY) return `${who}: communication lost${heldSuffix(a.state)}`;
  const s = parseLimitKey(a.key);
  if (!s) return `${who}: ${a.key} alarm raised${heldSuffix(a.state)}`;
  const label = lowerFirst(signalInfo[s.signal].label);
  const rel = s.direction === "high" ? "above" : "below";
  const value = a.value != null ? ` ${formatSignalValue(s.signal, a.value)}` : "";
  const limit = a.limitValue != null ? ` ${rel} ${a.priority} limit ${formatLimitValue(s.signal, a.limitValue)}` : ` ${s.direction} (${a.priority})`;
  const chatter = a.chattering ? "; chattering (raised repeatedly within a minute)" : "";
  return `${who}: ${label}${value}${limit}${chatter}${heldSuffix(a.state)}`;
}

/** "HR-1 Bay compressor: final-stage temperature back to 161.0 °C, within warning limit 175 °C". */
export function clearSentence(a: AlarmSentenceInput & { reason?: "returned" | "limit-removed" }): string {
  const who = a.compressorName;
  if (a.key === TRIP_ALARM_KEY) {
    const code = a.tripCode != null ? ` (code ${a.tripCode}, ${tripCodeLabel(a.tripCode)})` : "";
    return `${who}: trip reset${code}`;
  }
  if (a.key === COMMS_ALARM_KEY) return `${who}: communication restored`;
  const s = parseLimitKey(a.key);
  if (!s) return `${who}: ${a.key} alarm cleared`;
  const label = lowerFirst(signalInfo[s.signal].label);
  if (a.reason === "limit-removed") return `${who}: ${label} ${s.direction} (${a.priority}) cleared: the limit was removed`;
  const value = a.value != null ? `back to ${formatSignalValue(s.signal, a.value)}` : "returned";
  const limit = a.limitValue != null ? `, within ${a.priority} limit ${formatLimitValue(s.signal, a.limitValue)}` : "";
  return `${who}: ${label} ${value}${limit}`;
}

/** "HR-1 Bay compressor: final-stage temperature high (warning) suppressed by design: unit in standby". */
export function suppressSentence(a: AlarmSentenceInput & { runState: RunState }): string {
  return `${a.compressorName}: ${lowerFirst(alarmTitle(a))} (${a.priority}) suppressed by design: unit ${runStateWords[a.runState]}`;
}

/** The unit has run past its settling time: a suppressed alarm whose condition is gone returns to normal. */
export function unsuppressSentence(a: AlarmSentenceInput & { active: boolean }): string {
  const tail = a.active ? "condition still present, announced again" : "condition gone, returned to normal";
  return `${a.compressorName}: ${lowerFirst(alarmTitle(a))} (${a.priority}) no longer suppressed: ${tail}`;
}

export function unshelveSentence(a: AlarmSentenceInput & { active: boolean }): string {
  const tail = a.active ? "still active, announced again" : "condition gone, returned to normal";
  return `${a.compressorName}: shelving of ${lowerFirst(alarmTitle(a))} (${a.priority}) ended: ${tail}`;
}

export function reAlarmSentence(a: AlarmSentenceInput & { acknowledgedAgoMs: number }): string {
  return `${a.compressorName}: ${lowerFirst(alarmTitle(a))} (${a.priority}) still active ${formatDuration(a.acknowledgedAgoMs)} after acknowledgement, announced again`;
}

const quote = (comment: string) => `“${comment.trim()}”`;

export function acknowledgeSentence(a: AlarmSentenceInput & { actor: string; comment: string }): string {
  const base = `${a.actor} acknowledged ${a.compressorName}: ${alarmTitle(a)} (${a.priority})`;
  return a.comment ? `${base}: ${quote(a.comment)}` : base;
}

export function shelveSentence(a: AlarmSentenceInput & { actor: string; comment: string; minutes: number }): string {
  return `${a.actor} shelved ${a.compressorName}: ${alarmTitle(a)} (${a.priority}) for ${formatDuration(a.minutes * 60_000)}: ${quote(a.comment)}`;
}

export function outOfServiceSentence(a: AlarmSentenceInput & { actor: string; reason: string }): string {
  return `${a.actor} removed ${a.compressorName}: ${alarmTitle(a)} (${a.priority}) from service: ${quote(a.reason)}`;
}

export function returnToServiceSentence(a: AlarmSentenceInput & { actor: string; comment: string; active: boolean }): string {
  const tail = a.active ? "; condition present, announced again" : "";
  return `${a.actor} returned ${a.compressorName}: ${alarmTitle(a)} (${a.priority}) to service${tail}: ${quote(a.comment)}`;
}

/** "45 min", "4 h", "2 h 30 min". */
export function formatDuration(ms: number): string {
  const totalMin = Math.round(ms / 60_000);
  if (totalMin < 60) return `${totalMin} min`;
  const h = Math.floor(totalMin / 60);
  const m = totalMin % 60;
  return m === 0 ? `${h} h` : `${h} h ${m} min`;
}
