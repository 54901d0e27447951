import { describe, expect, it } from "vitest";
import { MIN_FILL_RATE_BAR_PER_MIN, timeToStopMinutes } from "@/shared/board";

const filling = (deliveryBar: number | null, fillRateBarPerMin: number | null, runState: "running" | "standby" | "stopped" | "tripped" = "running") => ({
  runState,
  deliveryBar,
  fillRateBarPerMin,
});

describe("timeToStopMinutes = (stop − current) / fill rate", () => {
  it("divides the pressure still to go by the fill rate", () => {
    // 414 bar stop, 380 bar now, rising 8.5 bar/min → 34 / 8.5 = 4 min
    expect(timeToStopMinutes(filling(380, 8.5), 414)).toBeCloseTo(4, 10);
    // 300 bar stop, 120 bar now, 3 bar/min → 60 min
    expect(timeToStopMinutes(filling(120, 3), 300)).toBeCloseTo(60, 10);
  });

  it("is null when the compressor is not filling", () => {
    expect(timeToStopMinutes(filling(380, 8.5, "standby"), 414)).toBeNull();
    expect(timeToStopMinutes(filling(380, 8.5, "tripped"), 414)).toBeNull();
    expect(timeToStopMinutes(filling(380, null), 414)).toBeNull();
    expect(timeToStopMinutes(filling(null, 8.5), 414)).toBeNull();
    expect(timeToStopMinutes(filling(380, -2), 414)).toBeNull(); // the bank is being drawn down faster than it fills
    expect(timeToStopMinutes(filling(380, MIN_FILL_RATE_BAR_PER_MIN / 2), 414)).toBeNull();
    expect(timeToStopMinutes(null, 414)).toBeNull();
  });

  it("is zero once the stop pressure is reached while still filling", () => {
    expect(timeToStopMinutes(filling(414, 5), 414)).toBe(0);
    expect(timeToStopMinutes(filling(416, 5), 414)).toBe(0);
  });
});
