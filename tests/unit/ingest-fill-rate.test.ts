import { describe, expect, it } from "vitest";
import { FillRateWindow } from "@/lib/ingester/fill-rate";

describe("FillRateWindow (least-squares slope of delivery pressure)", () => {
  it("returns the exact slope of a straight line, in bar per minute", () => {
    const w = new FillRateWindow();
    // 0.5 bar every 2 s = 15 bar/min
    for (let i = 0; i <= 20; i++) w.add(1_000_000 + i * 2_000, 200 + i * 0.5, true);
    expect(w.slopeBarPerMin()).toBeCloseTo(15, 9);
  });

  it("matches a hand-computed least-squares fit on uneven data", () => {
    const w = new FillRateWindow(60_000, 3, 1_000);
    // x (s) = 0, 10, 20, 30; y = 100, 101, 103, 104 → slope = Σdxdy/Σdx² = 70/500 = 0.14 bar/s = 8.4 bar/min
    [100, 101, 103, 104].forEach((p, i) => w.add(i * 10_000, p, true));
    expect(w.slopeBarPerMin()).toBeCloseTo(8.4, 9);
  });

  it("uses only the last 60 s", () => {
    const w = new FillRateWindow();
    for (let i = 0; i < 60; i++) w.add(i * 1_000, 100, true); // flat for a minute
    for (let i = 60; i <= 180; i++) w.add(i * 1_000, 100 + (i - 60) * 0.1, true); // then 6 bar/min
    expect(w.slopeBarPerMin()).toBeCloseTo(6, 6);
  });

  it("stays exact over hours of running at 10 readings/s (running sums are re-based)", () => {
    const w = new FillRateWindow();
    const t0 = 1_750_000_000_000;
    // 3 h at 100 ms; pressure rises 0.02 bar per reading = 12 bar/min, on a slow sawtooth to keep it in range.
    for (let i = 0; i < 108_000; i++) w.add(t0 + i * 100, 200 + (i % 6_000) * 0.02 + 1e-3 * Math.sin(i), true);
    expect(w.slopeBarPerMin()).toBeCloseTo(12, 3);
  });

  it("is unknown with too few or too closely spaced samples, and resets when the unit stops", () => {
    const w = new FillRateWindow();
    w.add(0, 100, true);
    w.add(1_000, 101, true);
    expect(w.slopeBarPerMin()).toBeNull();
    for (let i = 2; i < 10; i++) w.add(i * 1_000, 100 + i, true);
    expect(w.slopeBarPerMin()).toBeCloseTo(60, 6);
    w.add(10_000, 110, false);
    expect(w.slopeBarPerMin()).toBeNull();
  });

  it("reports a steady slope only over a long enough span with a small standard error", () => {
    const w = new FillRateWindow(120_000);
    // 6 bar/min, every 5 s: not yet after 30 s, then exactly 6 once a minute is covered
    for (let i = 0; i <= 6; i++) w.add(i * 5_000, 300 + i * 0.5, true);
    expect(w.steadySlopeBarPerMin(60_000, 0.1)).toBeNull();
    for (let i = 7; i <= 12; i++) w.add(i * 5_000, 300 + i * 0.5, true);
    expect(w.steadySlopeBarPerMin(60_000, 0.1)).toBeCloseTo(6, 9);
    // a cylinder fill starts drawing off: the rise stops, the line bends, and the slope is no longer trusted
    for (let i = 13; i <= 24; i++) w.add(i * 5_000, 306 + (i % 2) * 0.3, true);
    expect(w.steadySlopeBarPerMin(60_000, 0.1)).toBeNull();
  });
});
