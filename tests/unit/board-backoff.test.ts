import { describe, expect, it } from "vitest";
import { backoffDelayMs, LIVE_BACKOFF } from "@/shared/board";

describe("backoffDelayMs (exponential, capped, equal jitter)", () => {
  const opts = { baseMs: 1_000, maxMs: 30_000 };

  it("doubles the step each attempt up to the cap", () => {
    const lowest = [0, 1, 2, 3, 4, 5, 6, 10, 50].map((a) => backoffDelayMs(a, opts, () => 0));
    const highest = [0, 1, 2, 3, 4, 5, 6, 10, 50].map((a) => backoffDelayMs(a, opts, () => 1));
    expect(highest).toEqual([1_000, 2_000, 4_000, 8_000, 16_000, 30_000, 30_000, 30_000, 30_000]);
    expect(lowest).toEqual(highest.map((h) => h / 2));
  });

  it("spreads the delay over the upper half of the step", () => {
    expect(backoffDelayMs(3, opts, () => 0.5)).toBe(6_000);
    for (let i = 0; i < 200; i++) {
      const d = backoffDelayMs(4, opts);
      expect(d).toBeGreaterThanOrEqual(8_000);
      expect(d).toBeLessThanOrEqual(16_000);
    }
  });

  it("never waits longer than the cap, nor zero", () => {
    for (let a = 0; a < 100; a++) {
      const d = backoffDelayMs(a, LIVE_BACKOFF);
      expect(d).toBeGreaterThanOrEqual(LIVE_BACKOFF.baseMs / 2);
      expect(d).toBeLessThanOrEqual(LIVE_BACKOFF.maxMs);
    }
  });

  it("tolerates odd input", () => {
    expect(backoffDelayMs(-3, opts, () => 1)).toBe(1_000);
    expect(backoffDelayMs(2.7, opts, () => 1)).toBe(4_000);
    expect(backoffDelayMs(0, opts, () => 7)).toBe(1_000);
  });
});
