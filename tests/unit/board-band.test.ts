import { describe, expect, it } from "vitest";
import { bandGeometry } from "@/shared/board";

describe("bandGeometry", () => {
  const marks = [
    { key: "restart", label: "R", value: 370 },
    { key: "stop", label: "S", value: 414 },
  ];

  it("places the value and the setpoints along 0 … rated pressure", () => {
    const g = bandGeometry({ min: 0, max: 420, value: 210, marks });
    expect(g.valuePct).toBeCloseTo(50, 10);
    expect(g.marks.map((m) => [m.key, Number(m.pct.toFixed(3))])).toEqual([
      ["restart", 88.095],
      ["stop", 98.571],
    ]);
    expect(g.over).toBe(false);
    expect(g.under).toBe(false);
  });

  it("clamps a value beyond the ends and says so", () => {
    const over = bandGeometry({ min: 0, max: 420, value: 431 });
    expect(over.valuePct).toBe(100);
    expect(over.over).toBe(true);
    const under = bandGeometry({ min: 0, max: 420, value: -0.4 });
    expect(under.valuePct).toBe(0);
    expect(under.under).toBe(true);
  });

  it("has no value position without a value", () => {
    expect(bandGeometry({ min: 0, max: 420, value: null }).valuePct).toBeNull();
    expect(bandGeometry({ min: 0, max: 420, value: Number.NaN }).valuePct).toBeNull();
  });

  it("maps a normal range on an offset scale", () => {
    const g = bandGeometry({ min: -10, max: 70, value: 30, normal: { from: 5, to: 40 } });
    expect(g.valuePct).toBeCloseTo(50, 10);
    expect(g.normal).toEqual({ fromPct: 18.75, toPct: 62.5 });
  });

  it("does not divide by zero on a degenerate band", () => {
    expect(bandGeometry({ min: 5, max: 5, value: 5 }).valuePct).toBe(0);
  });
});
