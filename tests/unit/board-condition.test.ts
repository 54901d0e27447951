import { describe, expect, it } from "vitest";
import { classifyCondition, formatAge, formatMinutes, minutesParts } from "@/shared/board";
import { STALE_AFTER_MS } from "@/shared/live";

const NOW = 1_750_000_000_000;
const reading = (over: Partial<{ online: boolean; receivedAt: number | null; runState: "running" | "standby" | "stopped" | "starting" | "tripped" | null }> = {}) => ({
  online: true,
  receivedAt: NOW - 4_000,
  runState: "running" as const,
  ...over,
});

describe("classifyCondition", () => {
  it("shows the run state of a fresh reading from an online device", () => {
    expect(classifyCondition(reading(), NOW)).toEqual({ freshness: "live", word: "Running", ageMs: 4_000, current: true });
    expect(classifyCondition(reading({ runState: "standby" }), NOW).word).toBe("Standby");
    expect(classifyCondition(reading({ runState: "starting" }), NOW).word).toBe("Starting");
    expect(classifyCondition(reading({ runState: "stopped" }), NOW).word).toBe("Stopped");
    expect(classifyCondition(reading({ runState: "tripped" }), NOW).word).toBe("Tripped");
  });

  it("calls a reading older than STALE_AFTER_MS stale, never live", () => {
    const atLimit = classifyCondition(reading({ receivedAt: NOW - STALE_AFTER_MS }), NOW);
    expect(atLimit.freshness).toBe("live");
    const past = classifyCondition(reading({ receivedAt: NOW - STALE_AFTER_MS - 1 }), NOW);
    expect(past).toMatchObject({ freshness: "stale", word: "Stale", current: false, ageMs: STALE_AFTER_MS + 1 });
  });

  it("says Offline when the device's status is offline, however fresh the last reading", () => {
    expect(classifyCondition(reading({ online: false, receivedAt: NOW - 1_000 }), NOW)).toMatchObject({
      freshness: "offline",
      word: "Offline",
      current: false,
      ageMs: 1_000,
    });
  });

  it("treats a compressor that never reported as offline with no age", () => {
    expect(classifyCondition(null, NOW)).toMatchObject({ freshness: "nodata", word: "Offline", ageMs: null, current: false });
    expect(classifyCondition(reading({ receivedAt: null }), NOW).freshness).toBe("nodata");
  });

  it("does not report a negative age when clocks disagree slightly", () => {
    expect(classifyCondition(reading({ receivedAt: NOW + 500 }), NOW).ageMs).toBe(0);
  });
});

describe("formatAge", () => {
  it.each([
    [0, "0 s ago"],
    [4_200, "4 s ago"],
    [59_999, "59 s ago"],
    [60_000, "1 min ago"],
    [3_599_000, "59 min ago"],
    [3_600_000, "1 h ago"],
    [47 * 3_600_000, "47 h ago"],
    [48 * 3_600_000, "2 d ago"],
    [null, "no reading yet"],
  ] as const)("%s ms → %s", (ms, text) => {
    expect(formatAge(ms)).toBe(text);
  });
});

describe("formatMinutes and minutesParts", () => {
  it("formats durations for the page and compactly for a tile", () => {
    expect(formatMinutes(null)).toBe("—");
    expect(formatMinutes(0.4)).toBe("< 1 min");
    expect(formatMinutes(12.4)).toBe("12 min");
    expect(formatMinutes(65)).toBe("1 h 05 min");
    expect(minutesParts(null)).toEqual({ value: "—", unit: "" });
    expect(minutesParts(0.2)).toEqual({ value: "<1", unit: "min" });
    expect(minutesParts(42.6)).toEqual({ value: "43", unit: "min" });
    expect(minutesParts(150)).toEqual({ value: "2.5", unit: "h" });
    expect(minutesParts(10_000)).toEqual({ value: ">99", unit: "h" });
  });
});
