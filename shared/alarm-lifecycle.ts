/**
 * Alarm states and transitions after ANSI/ISA-18.2-2016 (IEC 62682), figure "alarm state transition diagram":
 * A normal, B active-unacknowledged, C active-acknowledged, D cleared-unacknowledged (return to normal unacknowledged),
 * and the out-of-normal handling states shelved, suppressed by design and out of service.
 */
export const alarmStates = [
  "normal",
  "active-unacknowledged",
  "active-acknowledged",
  "cleared-unacknowledged",
  "shelved",
  "suppressed",
  "out-of-service",
] as const;
export type AlarmState = (typeof alarmStates)[number];

export type AlarmInput =
  | { type: "activate" }
  | { type: "clear" }
  | { type: "acknowledge" }
  | { type: "shelve" }
  | { type: "unshelve"; active: boolean }
  | { type: "suppress" }
  | { type: "unsuppress"; active: boolean }
  | { type: "remove-from-service" }
  | { type: "return-to-service"; active: boolean };

export const stateLabels: Record<AlarmState, string> = {
  normal: "Normal",
  "active-unacknowledged": "Active, unacknowledged",
  "active-acknowledged": "Active, acknowledged",
  "cleared-unacknowledged": "Cleared, unacknowledged",
  shelved: "Shelved",
  suppressed: "Suppressed by design",
  "out-of-service": "Out of service",
};

/** The next state, or null when the input does not apply in this state (the caller refuses it). */
export function nextAlarmState(state: AlarmState, input: AlarmInput): AlarmState | null {
  switch (input.type) {
    case "activate":
      // Held as it is while already active, shelved, suppressed or out of service.
      return state === "normal" || state === "cleared-unacknowledged" ? "active-unacknowledged" : state;
    case "clear":
      if (state === "active-unacknowledged") return "cleared-unacknowledged";
      if (state === "active-acknowledged") return "normal";
      return state;
    case "acknowledge":
      if (state === "active-unacknowledged") return "active-acknowledged";
      if (state === "cleared-unacknowledged") return "normal";
      return null;
    case "shelve":
      return state === "out-of-service" || state === "suppressed" ? null : "shelved";
    case "unshelve":
      return state === "shelved" ? (input.active ? "active-unacknowledged" : "normal") : null;
    case "suppress":
      return state === "out-of-service" || state === "shelved" ? state : "suppressed";
    case "unsuppress":
      return state === "suppressed" ? (input.active ? "active-unacknowledged" : "normal") : state;
    case "remove-from-service":
      return "out-of-service";
    case "return-to-service":
      return state === "out-of-service" ? (input.active ? "active-unacknowledged" : "normal") : null;
  }
}


/** An acknowledged alarm still active after reAlarmS is announced again as unacknowledged. */
export function dueForReAlarm(state: AlarmState, acknowledgedAt: number | null, now: number, reAlarmS: number): boolean {
  return reAlarmS > 0 && state === "active-acknowledged" && acknowledgedAt !== null && now - acknowledgedAt >= reAlarmS * 1000;
}
