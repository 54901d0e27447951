import { describe, expect, it } from "vitest";
import { evaluateSample, finalStageTemperature, initialEvaluatorState, type AlarmSample } from "@/shared/alarm-eval";
import type { AlarmSettings, Limit } from "@/shared/alarm-rules";
import type { RunState } from "@/shared/telemetry";

const settings: AlarmSettings = { settlingS: 60, reAlarmS: 0, chatterCount: 3, chatterWindowS: 60 };
const highTemp: Limit = { signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 10, offDelayS: 5 };
const lowOil: Limit = { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 0, offDelayS: 0 };
const highDelivery: Limit = { signal: "deliveryBar", direction: "high", priority: "advisory", value: 310, deadband: 2, onDelayS: 0, offDelayS: 0 };

/** Runs a series of [seconds, value] through one limit, the unit running and settled since t = -1000 s. */
function run(limit: Limit, series: [number, number | null, RunState?][]) {
  const state = initialEvaluatorState();
  evaluateSample(state, [limit], { ts: -1_000_000, runState: "running", values: {} }, settings);
  return series.flatMap(([s, v, runState]) =>
    evaluateSample(state, [limit], { ts: s * 1000, runState: runState ?? "running", values: { [limit.signal]: v } }, settings).map(
      (e) => `${e.kind}@${s}${e.chattering ? " chattering" : ""}${e.suppressed ? " suppressed" : ""}`,
    ),
  );
}

// Deadband, on-delay and off-delay as defined in the ANSI/ISA-18.2-2016 definitions clause.
describe("alarm evaluation against the ISA-18.2 definitions", () => {
  const cases: { name: string; limit: Limit; series: [number, number | null, RunState?][]; expected: string[] }[] = [
    { name: "raises only after the on-delay has elapsed with the value beyond the limit", limit: highTemp, series: [[0, 161], [5, 162], [10, 163]], expected: ["raise@10"] },
    { name: "a value that dips back within the on-delay restarts it", limit: highTemp, series: [[0, 161], [5, 159], [8, 161], [15, 161], [18, 161]], expected: ["raise@18"] },
    { name: "does not clear inside the deadband", limit: highTemp, series: [[0, 161], [10, 161], [20, 157], [30, 155.5]], expected: ["raise@10"] },
    { name: "clears below limit − deadband after the off-delay", limit: highTemp, series: [[0, 161], [10, 161], [20, 150], [24, 150], [25, 150]], expected: ["raise@10", "clear@25"] },
    { name: "a low limit raises below and clears above limit + deadband", limit: lowOil, series: [[0, 2.0], [1, 1.4], [2, 1.6], [3, 1.9]], expected: ["raise@1", "clear@3"] },
    { name: "exactly at the limit is not beyond it", limit: highDelivery, series: [[0, 310], [1, 310.1]], expected: ["raise@1"] },
    { name: "a missing reading holds the state", limit: lowOil, series: [[0, 1.0], [1, null], [2, null], [3, 2.0]], expected: ["raise@0", "clear@3"] },
    {
      name: "the third raise inside a minute is marked chattering",
      limit: highDelivery,
      series: [[0, 320], [10, 300], [20, 320], [30, 300], [40, 320], [50, 300], [130, 320]],
      expected: ["raise@0", "clear@10", "raise@20", "clear@30", "raise@40 chattering", "clear@50", "raise@130"],
    },
  ];
  for (const c of cases) it(c.name, () => expect(run(c.limit, c.series)).toEqual(c.expected));
});

describe("designed suppression (ANSI/ISA-18.2-2016 definitions)", () => {
  it("suppresses temperature and oil alarms while stopped and for the settling time after a start", () => {
    const state = initialEvaluatorState();
    const limits = [lowOil, highDelivery];
    const at = (s: number, runState: RunState, oil: number, delivery = 300): AlarmSample => ({
      ts: s * 1000,
      runState,
      values: { oilBar: oil, deliveryBar: delivery },
    });
    // Stopped with no oil pressure: no oil alarm; a delivery pressure alarm is not suppressed.
    expect(evaluateSample(state, limits, at(0, "standby", 0, 320), settings).map((e) => e.key)).toEqual(["deliveryBar.high.advisory"]);
    expect(evaluateSample(state, limits, at(10, "starting", 0), settings).map((e) => e.kind)).toEqual(["clear"]);
    expect(evaluateSample(state, limits, at(15, "running", 0.5), settings)).toEqual([]); // settling
    expect(evaluateSample(state, limits, at(70, "running", 0.5), settings)).toEqual([]); // 55 s after start
    expect(evaluateSample(state, limits, at(76, "running", 0.5), settings).map((e) => e.key)).toEqual(["oilBar.low.critical"]);
    // The unit stops: the oil alarm clears as suppressed, not as returned to normal.
    const stop = evaluateSample(state, limits, at(80, "standby", 0), settings);
    expect(stop).toMatchObject([{ kind: "clear", key: "oilBar.low.critical", suppressed: true }]);
  });
});

describe("the compressor's own trip", () => {
  it("is a critical alarm carrying the trip code, cleared when the unit leaves the tripped state", () => {
    const state = initialEvaluatorState();
    const raise = evaluateSample(state, [], { ts: 1000, runState: "tripped", tripCode: 12, values: {} }, settings);
    expect(raise).toMatchObject([{ kind: "raise", key: "trip", priority: "critical", tripCode: 12 }]);
    expect(evaluateSample(state, [], { ts: 2000, runState: "tripped", tripCode: 12, values: {} }, settings)).toEqual([]);
    expect(evaluateSample(state, [], { ts: 3000, runState: "stopped", values: {} }, settings)).toMatchObject([{ kind: "clear", key: "trip", tripCode: 12 }]);
  });

  it("resumes from stored active alarms without raising them again", () => {
    const state = initialEvaluatorState(["trip", "deliveryBar.high.advisory"]);
    expect(evaluateSample(state, [highDelivery], { ts: 0, runState: "tripped", values: { deliveryBar: 320 } }, settings)).toEqual([]);
  });
});

describe("final-stage temperature", () => {
  it("is the highest stage that reports", () => {
    expect(finalStageTemperature([120, 140, 150, null])).toBe(150);
    expect(finalStageTemperature([120, 140, 150, 155])).toBe(155);
    expect(finalStageTemperature([])).toBeNull();
  });
});
