import { describe, expect, it } from "vitest";
import { dueForReAlarm, nextAlarmState, type AlarmInput, type AlarmState } from "@/shared/alarm-lifecycle";

// ANSI/ISA-18.2-2016, alarm state transition diagram (state letters as recalled from memory): states A (normal), B (unack), C (ack), D (RTN unack),
// and E–G (shelved, suppressed by design, out of service).
const transitions: [AlarmState, AlarmInput, AlarmState | null][] = [
  ["normal", { type: "activate" }, "active-unacknowledged"], // A → B
  ["active-unacknowledged", { type: "acknowledge" }, "active-acknowledged"], // B → C
  ["active-acknowledged", { type: "clear" }, "normal"], // C → A
  ["active-unacknowledged", { type: "clear" }, "cleared-unacknowledged"], // B → D
  ["cleared-unacknowledged", { type: "acknowledge" }, "normal"], // D → A
  ["cleared-unacknowledged", { type: "activate" }, "active-unacknowledged"], // D → B
  ["normal", { type: "acknowledge" }, null],
  ["active-unacknowledged", { type: "shelve" }, "shelved"], // → E
  ["shelved", { type: "activate" }, "shelved"],
  ["shelved", { type: "unshelve", active: true }, "active-unacknowledged"],
  ["shelved", { type: "unshelve", active: false }, "normal"],
  ["active-acknowledged", { type: "suppress" }, "suppressed"], // → F
  ["suppressed", { type: "unsuppress", active: false }, "normal"],
  ["active-unacknowledged", { type: "remove-from-service" }, "out-of-service"], // → G
  ["out-of-service", { type: "shelve" }, null],
  ["out-of-service", { type: "return-to-service", active: true }, "active-unacknowledged"],
  ["normal", { type: "return-to-service", active: false }, null],
];

describe("alarm lifecycle", () => {
  for (const [from, input, to] of transitions) {
    it(`${from} + ${input.type} → ${to ?? "refused"}`, () => expect(nextAlarmState(from, input)).toBe(to));
  }

  it("re-announces an acknowledged alarm that stays active past the re-alarm time", () => {
    expect(dueForReAlarm("active-acknowledged", 0, 3_599_000, 3600)).toBe(false);
    expect(dueForReAlarm("active-acknowledged", 0, 3_600_000, 3600)).toBe(true);
    expect(dueForReAlarm("active-unacknowledged", 0, 9_000_000, 3600)).toBe(false);
    expect(dueForReAlarm("active-acknowledged", 0, 9_000_000, 0)).toBe(false);
  });
});
