import { describe, expect, it } from "vitest";
import { busiestTenMinutes, floodEpisodes, TEN_MINUTES_MS } from "@/shared/alarm-load";

// The sliding-window flood rule of ANSI/ISA-18.2-2016 (a flood begins above 10 alarms in 10 minutes per operator
// position and ends below 5; EEMUA 191 uses the same 10 per 10 minutes) — from memory, not checked against the texts.
// Answers worked out by hand in the comments.

const MIN = 60_000;
const T0 = Date.UTC(2026, 5, 1, 0, 0);
const every = (n: number, first: number, stepMs: number) => Array.from({ length: n }, (_, i) => first + i * stepMs);

describe("alarm floods on a sliding 10-minute window", () => {
  it("18 alarms in 9 minutes across a bucket edge is a flood", () => {
    // 9 alarms at 00:05:30–00:09:30 and 9 at 00:10:00–00:14:00, every 30 s: fixed buckets [00:00, 00:10) and
    // [00:10, 00:20) hold 9 each.
    const times = every(18, T0 + 5.5 * MIN, 30_000);
    const bucketCounts = [0, 1].map((b) => times.filter((t) => Math.floor((t - T0) / TEN_MINUTES_MS) === b).length);
    expect(bucketCounts).toEqual([9, 9]);
    // Sliding: the 11th (00:10:30) starts it; below 5 once the 14th (00:12:00) ages out at 00:22:00.
    expect(floodEpisodes(times, T0, T0 + 60 * MIN)).toEqual([{ start: T0 + 10.5 * MIN, end: T0 + 22 * MIN }]);
    expect(busiestTenMinutes(times)).toEqual({ count: 18, at: T0 + 5.5 * MIN });
  });

  it("exactly 10 in 10 minutes is not a flood; 11 is", () => {
    expect(floodEpisodes(every(10, T0, 60_000), T0, T0 + 60 * MIN)).toEqual([]);
    // 11 one minute apart: the 11th at 00:10 joins while the 1st (00:00) leaves at that same instant — still 10.
    expect(floodEpisodes(every(11, T0, 60_000), T0, T0 + 60 * MIN)).toEqual([]);
    // 11 at 55 s: the 11th at 00:09:10 makes 11.
    const eleven = every(11, T0, 55_000);
    const [flood] = floodEpisodes(eleven, T0, T0 + 60 * MIN);
    expect(flood!.start).toBe(T0 + 10 * 55_000);
    // Below 5 when the 7th (index 6, at 00:05:30) leaves at 00:15:30.
    expect(flood!.end).toBe(T0 + 6 * 55_000 + TEN_MINUTES_MS);
  });

  it("a flood lasts while 5 to 10 remain in the window (the end rule is lower than the start rule)", () => {
    // 11 in the first minute, then one every 2 minutes: 5 in any later 10 minutes, never fewer than 5 until they stop.
    const times = [...every(11, T0, 5_000), ...every(10, T0 + 2 * MIN, 2 * MIN)];
    const floods = floodEpisodes(times, T0, T0 + 120 * MIN);
    expect(floods).toHaveLength(1);
    // Last alarm at 00:20; the window falls to 4 when the one at 00:12 leaves at 00:22.
    expect(floods[0]).toEqual({ start: T0 + 50_000, end: T0 + 22 * MIN });
  });

  it("clips to the period and scales with operator positions", () => {
    const times = every(12, T0 - 5 * MIN, 20_000); // 23:55:00 to 23:58:40 the day before
    // Flood from 23:58:20 until the 8th (23:57:20) leaves at 00:07:20; inside the period from 00:00.
    expect(floodEpisodes(times, T0, T0 + 60 * MIN)).toEqual([{ start: T0, end: T0 + 7 * MIN + 20_000 }]);
    expect(floodEpisodes(times, T0 - 10 * MIN, T0 - 1 * MIN)).toEqual([{ start: T0 - 5 * MIN + 10 * 20_000, end: T0 - 1 * MIN }]);
    expect(floodEpisodes(times, T0 - 10 * MIN, T0 + 60 * MIN, 2)).toEqual([]);
  });
});
