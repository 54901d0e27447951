import { describe, expect, it } from "vitest";
import { compareLimits, mergeLimits } from "@/db/thresholds";
import { limitKey, type Limit } from "@/shared/alarm-rules";

type Row = Limit & { enabled: boolean };
const row = (l: Partial<Row> & Pick<Limit, "signal" | "direction" | "priority" | "value">): Row => ({
  deadband: 0,
  onDelayS: 0,
  offDelayS: 0,
  enabled: true,
  ...l,
});

const template: Row[] = [
  row({ signal: "finalStageC", direction: "high", priority: "critical", value: 180 }),
  row({ signal: "finalStageC", direction: "high", priority: "warning", value: 160 }),
  row({ signal: "oilBar", direction: "low", priority: "warning", value: 2 }),
  row({ signal: "intakeC", direction: "low", priority: "advisory", value: 2 }),
  row({ signal: "purifierC", direction: "high", priority: "advisory", value: 45, enabled: false }),
];

describe("effective limits: model template with per-compressor overrides", () => {
  it("the template applies as it is (a disabled template row applies to nobody), in evaluation order", () => {
    expect(mergeLimits(template, []).map(limitKey)).toEqual([
      "finalStageC.high.warning",
      "finalStageC.high.critical",
      "oilBar.low.warning",
      "intakeC.low.advisory",
    ]);
  });

  it("an override with the same signal, direction and priority replaces the inherited value", () => {
    const merged = mergeLimits(template, [row({ signal: "finalStageC", direction: "high", priority: "warning", value: 168, deadband: 4 })]);
    expect(merged.find((l) => limitKey(l) === "finalStageC.high.warning")).toMatchObject({ value: 168, deadband: 4 });
    expect(merged).toHaveLength(4);
  });

  it("an override with enabled = false removes the inherited limit; one with another priority adds a limit", () => {
    const merged = mergeLimits(template, [
      row({ signal: "intakeC", direction: "low", priority: "advisory", value: 2, enabled: false }),
      row({ signal: "oilBar", direction: "low", priority: "critical", value: 1.5 }),
    ]);
    expect(merged.map(limitKey)).toEqual(["finalStageC.high.warning", "finalStageC.high.critical", "oilBar.low.warning", "oilBar.low.critical"]);
  });

  it("rows that do not validate are left out", () => {
    const bad = [row({ signal: "nope" as Limit["signal"], direction: "high", priority: "warning", value: 1 }), row({ signal: "oilBar", direction: "low", priority: "critical", value: 1, deadband: -1 })];
    expect(mergeLimits(bad, [])).toEqual([]);
  });

  it("orders high before low and advisory → warning → critical within a signal", () => {
    const ls = [
      row({ signal: "intakeC", direction: "low", priority: "advisory", value: 2 }),
      row({ signal: "intakeC", direction: "high", priority: "critical", value: 45 }),
      row({ signal: "intakeC", direction: "high", priority: "advisory", value: 35 }),
    ];
    expect([...ls].sort(compareLimits).map(limitKey)).toEqual(["intakeC.high.advisory", "intakeC.high.critical", "intakeC.low.advisory"]);
  });
});
