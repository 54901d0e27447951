import { describe, expect, it } from "vitest";
import {
  alarmTitle,
  clearSentence,
  formatDuration,
  parseLimitKey,
  raiseSentence,
  reAlarmSentence,
  suppressSentence,
  unshelveSentence,
} from "@/shared/alarm-text";

const hr1 = { compressorName: "HR-1 Bay compressor" };

describe("alarm titles, one wording for screens, e-mails and the event log", () => {
  it.each([
    [{ key: "finalStageC.high.warning" }, "Final-stage temperature high"],
    [{ key: "oilBar.low.critical" }, "Oil pressure low"],
    [{ key: "intakeC.low.advisory" }, "Intake temperature low"],
    [{ key: "trip", tripCode: 110 }, "Trip 110: Final stage over-temperature"],
    [{ key: "trip", tripCode: 4242 }, "Trip 4242: Trip code 4242"],
    [{ key: "trip", tripCode: null }, "Compressor tripped"],
    [{ key: "comms" }, "Communication lost"],
    [{ key: "something.else" }, "something.else"],
  ])("%o → %s", (input, title) => expect(alarmTitle(input)).toBe(title));

  it("parses limit keys and rejects anything else", () => {
    expect(parseLimitKey("deliveryBar.high.advisory")).toEqual({ signal: "deliveryBar", direction: "high", priority: "advisory" });
    expect(parseLimitKey("deliveryBar.up.advisory")).toBeNull();
    expect(parseLimitKey("nope.high.warning")).toBeNull();
    expect(parseLimitKey("trip")).toBeNull();
  });
});

describe("event sentences: what, where, value against limit", () => {
  it("raise and clear of a limit", () => {
    expect(raiseSentence({ ...hr1, key: "finalStageC.high.warning", priority: "warning", value: 182.44, limitValue: 175 })).toBe(
      "HR-1 Bay compressor: final-stage temperature 182.4 °C above warning limit 175 °C",
    );
    expect(raiseSentence({ ...hr1, key: "oilBar.low.critical", priority: "critical", value: 1.234, limitValue: 1.5, state: "shelved" })).toBe(
      "HR-1 Bay compressor: oil pressure 1.23 bar below critical limit 1.5 bar (shelved)",
    );
    expect(clearSentence({ ...hr1, key: "finalStageC.high.warning", priority: "warning", value: 161, limitValue: 175 })).toBe(
      "HR-1 Bay compressor: final-stage temperature back to 161.0 °C, within warning limit 175 °C",
    );
  });

  it("trips, comms and the lifecycle's own transitions", () => {
    expect(raiseSentence({ ...hr1, key: "trip", priority: "critical", tripCode: 210 })).toBe(
      "HR-1 Bay compressor: tripped (code 210, Oil pressure low): lubricating oil pressure stayed below the trip limit while the motor ran",
    );
    expect(clearSentence({ ...hr1, key: "trip", priority: "critical", tripCode: 210 })).toBe("HR-1 Bay compressor: trip reset (code 210, Oil pressure low)");
    expect(raiseSentence({ ...hr1, key: "comms", priority: "warning" })).toBe("HR-1 Bay compressor: communication lost");
    expect(suppressSentence({ ...hr1, key: "oilBar.low.critical", priority: "critical", runState: "standby" })).toBe(
      "HR-1 Bay compressor: oil pressure low (critical) suppressed by design: unit in standby",
    );
    expect(unshelveSentence({ ...hr1, key: "oilBar.low.critical", priority: "critical", active: false })).toBe(
      "HR-1 Bay compressor: shelving of oil pressure low (critical) ended: condition gone, returned to normal",
    );
    expect(reAlarmSentence({ ...hr1, key: "oilBar.low.critical", priority: "critical", acknowledgedAgoMs: 4 * 3_600_000 })).toBe(
      "HR-1 Bay compressor: oil pressure low (critical) still active 4 h after acknowledgement, announced again",
    );
  });

  it("durations", () => {
    expect([5, 60, 90, 1440].map((m) => formatDuration(m * 60_000))).toEqual(["5 min", "1 h", "1 h 30 min", "24 h"]);
  });
});
