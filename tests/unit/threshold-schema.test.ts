import { describe, expect, it } from "vitest";
import { convertDraft, draftFrom, errorsByLine, parseNumber, rowsOf } from "@/components/thresholds/draft";
import {
  checkSet,
  deadbandFromDisplay,
  deadbandToDisplay,
  diffRows,
  fieldErrorsByPath,
  signalRange,
  thresholdSaveSchema,
  valueFromDisplay,
  valueToDisplay,
  type ThresholdRow,
} from "@/shared/threshold-schema";
import { telemetrySchema } from "@/shared/telemetry";
import type { UnitPreference } from "@/shared/units";

const row = (r: Partial<ThresholdRow> & Pick<ThresholdRow, "signal" | "direction" | "priority" | "value">): ThresholdRow => ({
  deadband: 0,
  onDelayS: 0,
  offDelayS: 0,
  enabled: true,
  ...r,
});

const template: ThresholdRow[] = [
  row({ signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 10, offDelayS: 30 }),
  row({ signal: "finalStageC", direction: "high", priority: "critical", value: 180, deadband: 5, onDelayS: 5, offDelayS: 30 }),
  row({ signal: "oilBar", direction: "low", priority: "warning", value: 2.0, deadband: 0.3 }),
  row({ signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3 }),
  row({ signal: "intakeC", direction: "high", priority: "warning", value: 40, deadband: 2 }),
  row({ signal: "intakeC", direction: "low", priority: "advisory", value: 2, deadband: 1 }),
];

const metric: UnitPreference = { pressureUnit: "bar", temperatureUnit: "C" };
const imperial: UnitPreference = { pressureUnit: "psi", temperatureUnit: "F" };

function errors(limits: ThresholdRow[], opts: { scopeType?: "model" | "compressor"; inherited?: ThresholdRow[]; reason?: string; units?: UnitPreference } = {}) {
  const scopeType = opts.scopeType ?? "model";
  const r = thresholdSaveSchema({ scopeType, inherited: opts.inherited, units: opts.units }).safeParse({
    scopeType,
    scopeId: 1,
    baseVersion: 3,
    reason: opts.reason ?? "Tuned after the summer fills",
    limits,
  });
  return r.success ? {} : fieldErrorsByPath(r.error);
}

describe("threshold set validation (one schema for the form and the server)", () => {
  it("accepts a consistent template", () => {
    expect(errors(template)).toEqual({});
  });

  it("a critical high limit must lie above its warning limit; the error lands at the value of both rows", () => {
    const limits = template.map((r) => (r.priority === "critical" && r.signal === "finalStageC" ? { ...r, value: 155 } : r));
    expect(errors(limits)).toEqual({
      "limits.1.value": ["Must be above the warning high limit (160 °C)"],
      "limits.0.value": ["Must be below the critical high limit (155 °C)"],
    });
  });

  it("a critical low limit must lie below its warning limit, and a warning beyond its advisory", () => {
    const limits = [
      row({ signal: "oilBar", direction: "low", priority: "advisory", value: 2.5 }),
      row({ signal: "oilBar", direction: "low", priority: "warning", value: 2.8 }),
      row({ signal: "oilBar", direction: "low", priority: "critical", value: 1.5 }),
    ];
    const e = errors(limits);
    expect(e["limits.1.value"]).toEqual(["Must be below the advisory low limit (2.5 bar)"]);
    expect(e["limits.0.value"]).toEqual(["Must be above the warning low limit (2.8 bar)"]);
    expect(e["limits.2.value"]).toBeUndefined();
  });

  it("an advisory and a critical with no warning between them are still ordered", () => {
    const limits = [
      row({ signal: "deliveryBar", direction: "high", priority: "advisory", value: 340 }),
      row({ signal: "deliveryBar", direction: "high", priority: "critical", value: 320 }),
    ];
    expect(errors(limits)["limits.1.value"]).toEqual(["Must be above the advisory high limit (340 bar)"]);
  });

  it("a high limit must lie above every low limit of the same signal", () => {
    const limits = [row({ signal: "intakeC", direction: "high", priority: "warning", value: 1 }), row({ signal: "intakeC", direction: "low", priority: "advisory", value: 2 })];
    const e = errors(limits);
    expect(e["limits.0.value"]).toEqual(["A high limit must be above the advisory low limit (2 °C)"]);
    expect(e["limits.1.value"]).toEqual(["A low limit must be below the warning high limit (1 °C)"]);
  });

  it("the deadband is ≥ 0 and smaller than the gap to the next limit it falls back towards", () => {
    const negative = template.map((r, i) => (i === 0 ? { ...r, deadband: -1 } : r));
    expect(errors(negative)["limits.0.deadband"]).toEqual(["The deadband cannot be negative"]);
    // Critical 180 with a 20 K deadband reaches down past the warning at 160.
    const wide = template.map((r, i) => (i === 1 ? { ...r, deadband: 20 } : r));
    expect(errors(wide)["limits.1.deadband"]).toEqual(["Must be smaller than the 20 °C gap to the warning high limit (160 °C)"]);
    const edge = template.map((r, i) => (i === 1 ? { ...r, deadband: 19.9 } : r));
    expect(errors(edge)).toEqual({});
    // A low limit's deadband rises towards the limits above it.
    const oil = template.map((r, i) => (i === 3 ? { ...r, deadband: 0.5 } : r));
    expect(errors(oil)["limits.3.deadband"]).toEqual(["Must be smaller than the 0.5 bar gap to the warning low limit (2 bar)"]);
  });

  it("delays are whole seconds from 0 to 600", () => {
    const e = errors([
      row({ signal: "purifierC", direction: "high", priority: "advisory", value: 45, onDelayS: 601 }),
      row({ signal: "purifierC", direction: "high", priority: "warning", value: 50, offDelayS: -1 }),
      row({ signal: "purifierC", direction: "high", priority: "critical", value: 55, onDelayS: 2.5 }),
    ]);
    expect(e["limits.0.onDelayS"]).toEqual(["Between 0 and 600 s"]);
    expect(e["limits.1.offDelayS"]).toEqual(["Between 0 and 600 s"]);
    expect(e["limits.2.onDelayS"]).toEqual(["Whole seconds"]);
  });

  it("values lie inside the sensor's range from the telemetry contract, said in the person's units", () => {
    expect(signalRange.deliveryBar).toEqual({ min: telemetrySchema.shape.deliveryBar.minValue, max: telemetrySchema.shape.deliveryBar.maxValue });
    expect(signalRange.oilBar).toEqual({ min: -1, max: 30 });
    expect(signalRange.finalStageC).toEqual({ min: -50, max: 350 });
    expect(signalRange.intakeC).toEqual({ min: -50, max: 80 });
    const limits = [row({ signal: "finalStageC", direction: "high", priority: "warning", value: 400 })];
    expect(errors(limits)["limits.0.value"]).toEqual(["Outside the sensor's range, -50 °C to 350 °C"]);
    expect(errors(limits, { units: imperial })["limits.0.value"]).toEqual(["Outside the sensor's range, -58 °F to 662 °F"]);
  });

  it("a reason of at least 5 characters is required", () => {
    expect(errors(template, { reason: "  ok  " }).reason).toEqual(["Say why, in at least 5 characters"]);
    expect(errors(template, { reason: "Fan replaced" })).toEqual({});
  });

  it("NaN from an empty field is reported at that field", () => {
    const limits = template.map((r, i) => (i === 2 ? { ...r, value: Number.NaN } : r));
    expect(errors(limits)["limits.2.value"]).toEqual(["Enter the limit as a number"]);
  });

  it("one row per signal, direction and priority", () => {
    expect(errors([...template, { ...template[0]!, value: 150 }])["limits.6.priority"]).toEqual([
      "This signal already has a limit of this direction and priority",
    ]);
  });

  it("a compressor's overrides are checked against what it inherits; only its own rows carry errors", () => {
    // Lowering the compressor's critical below the inherited warning is refused at the override.
    const override = [row({ signal: "finalStageC", direction: "high", priority: "critical", value: 158, deadband: 1 })];
    expect(errors(override, { scopeType: "compressor", inherited: template })).toEqual({
      "limits.0.value": ["Must be above the warning high limit (160 °C)"],
    });
    // Raising the warning to 176 leaves the inherited critical's 5 K deadband reaching past it.
    const tooClose = [row({ signal: "finalStageC", direction: "high", priority: "warning", value: 176, deadband: 2 })];
    expect(errors(tooClose, { scopeType: "compressor", inherited: template })).toEqual({
      "limits.0.value": ["Too close to the inherited critical high limit: its 5 °C deadband reaches past this value"],
    });
    // Switching the inherited warning off leaves critical alone: fine. Switching off something not inherited is not.
    const off = [row({ signal: "finalStageC", direction: "high", priority: "warning", value: 160, enabled: false })];
    expect(errors(off, { scopeType: "compressor", inherited: template })).toEqual({});
    const nothing = [row({ signal: "stage2C", direction: "high", priority: "warning", value: 160, enabled: false })];
    expect(errors(nothing, { scopeType: "compressor", inherited: template })).toEqual({ "limits.0.enabled": ["Nothing is inherited here to switch off"] });
    // A template removes a limit rather than switching it off.
    expect(errors(off)).toEqual({ "limits.0.enabled": ["Remove the limit from the template instead of switching it off"] });
    // Inherited rows that break a rule among themselves are not the compressor's to fix.
    const brokenTemplate = template.map((r, i) => (i === 1 ? { ...r, value: 150 } : r));
    expect(checkSet([], { scopeType: "compressor", inherited: brokenTemplate })).toEqual([]);
  });
});

describe("units: entered and shown in the person's units, stored in bar and °C", () => {
  it("converts limit values with NIST SP 811 factors and the temperature offset", () => {
    // NIST SP 811 (2008) B.8: 1 psi = 6.894 757 E+03 Pa; 1 bar = 1.0 E+05 Pa.
    expect(valueToDisplay("deliveryBar", 300, imperial)).toBeCloseTo(4351.13, 2);
    expect(valueFromDisplay("deliveryBar", 4351.13, imperial)).toBeCloseTo(300, 3);
    expect(valueToDisplay("finalStageC", 160, imperial)).toBe(320);
    expect(valueFromDisplay("finalStageC", 320, imperial)).toBe(160);
  });

  it("a temperature deadband converts as a difference (5 K = 9 °F), a pressure deadband as a pressure", () => {
    expect(deadbandToDisplay("finalStageC", 5, imperial)).toBe(9);
    expect(deadbandFromDisplay("finalStageC", 9, imperial)).toBe(5);
    expect(deadbandToDisplay("oilBar", 0.3, imperial)).toBeCloseTo(4.351, 3);
    expect(deadbandToDisplay("finalStageC", 5, metric)).toBe(5);
  });

  it("the editor keeps an untouched value exactly, converts a typed one, and maps errors back to its line", () => {
    const d = draftFrom("compressor", [row({ signal: "oilBar", direction: "low", priority: "warning", value: 2.0, deadband: 0.3 })], template, imperial);
    expect(d.lines.map((l) => [l.key, l.mode])).toEqual([
      ["finalStageC.high.warning", "inherit"],
      ["finalStageC.high.critical", "inherit"],
      ["oilBar.low.warning", "own"],
      ["oilBar.low.critical", "inherit"],
      ["intakeC.high.warning", "inherit"],
      ["intakeC.low.advisory", "inherit"],
    ]);
    const oil = d.lines[2]!;
    expect(oil.text).toEqual({ value: "29", deadband: "4.4", onDelayS: "0", offDelayS: "0" });
    // 29.0 psi is 1.99948 bar; untouched, the stored 2.0 bar is kept.
    expect(rowsOf(d, imperial).rows[0]!.value).toBe(2.0);
    const typed = { ...d, lines: d.lines.map((l) => (l.key === oil.key ? { ...l, text: { ...l.text, value: "30" } } : l)) };
    expect(rowsOf(typed, imperial).rows[0]!.value).toBeCloseTo(2.0684, 4);
    const off = { ...d, lines: d.lines.map((l, i) => (i === 0 ? { ...l, mode: "off" as const } : l)) };
    const { rows, lineOf } = rowsOf(off, imperial);
    expect(rows.map((r) => [r.signal, r.enabled])).toEqual([
      ["finalStageC", false],
      ["oilBar", true],
    ]);
    expect(errorsByLine({ "limits.1.value": ["Too high"], reason: ["x"] }, lineOf)).toEqual(new Map([["oilBar.low.warning", { value: "Too high" }]]));
    expect(parseNumber("2,5")).toBe(2.5);
    expect(parseNumber("")).toBeNaN();
    expect(parseNumber("12abc")).toBeNaN();
  });

  it("switching units mid-edit keeps what every typed number stands for", () => {
    const d = draftFrom("model", template, [], metric);
    const typed = { ...d, lines: d.lines.map((l, i) => (i === 0 ? { ...l, text: { ...l.text, value: "150", deadband: "4" } } : l)) };
    const f = convertDraft(typed, metric, imperial);
    expect(f.lines[0]!.text).toMatchObject({ value: "302", deadband: "7.2" });
    expect(f.lines[2]!.text.value).toBe("29");
    const before = rowsOf(typed, metric).rows;
    const after = rowsOf(f, imperial).rows;
    expect(after.map((r) => [r.value, r.deadband])).toEqual(before.map((r) => [r.value, r.deadband]));
  });

  it("diffs list added, removed and changed rows field by field", () => {
    const after = [
      { ...template[0]!, value: 150 },
      template[1]!,
      row({ signal: "stage2C", direction: "high", priority: "warning", value: 170 }),
    ];
    expect(diffRows(template.slice(0, 3), after)).toEqual([
      { key: "finalStageC.high.warning", kind: "changed", fields: [{ field: "value", before: 160, after: 150 }] },
      expect.objectContaining({ key: "stage2C.high.warning", kind: "added" }),
      expect.objectContaining({ key: "oilBar.low.warning", kind: "removed" }),
    ]);
  });
});
