import { describe, expect, it } from "vitest";
import {
  breakGaps,
  MAX_TREND_POINTS,
  trendBucketMs,
  trendSourceFor,
  trendSpanMs,
  trendSpans,
  type TrendPoint,
} from "@/shared/board";

describe("trend source and bucket size", () => {
  it("reads raw readings up to 6 h, 1-minute rollups up to 7 d, 1-hour rollups beyond", () => {
    expect(trendSpans.map((s) => [s, trendSourceFor(trendSpanMs[s])])).toEqual([
      ["15m", "raw"],
      ["1h", "raw"],
      ["6h", "raw"],
      ["24h", "1m"],
      ["7d", "1m"],
      ["30d", "1h"],
      ["90d", "1h"],
      ["1y", "1h"],
    ]);
  });

  it("keeps every span within the point budget, in whole multiples of the source's resolution", () => {
    for (const s of trendSpans) {
      const spanMs = trendSpanMs[s];
      const source = trendSourceFor(spanMs);
      const bucket = trendBucketMs(spanMs, source);
      const resolution = source === "raw" ? 1_000 : source === "1m" ? 60_000 : 3_600_000;
      expect(bucket % resolution).toBe(0);
      // +1: the window is aligned to whole buckets and may straddle one more.
      expect(Math.ceil(spanMs / bucket) + 1).toBeLessThanOrEqual(MAX_TREND_POINTS + 1);
    }
    expect(trendBucketMs(trendSpanMs["15m"], "raw")).toBe(1_000);
    expect(trendBucketMs(trendSpanMs["6h"], "raw")).toBe(22_000);
    expect(trendBucketMs(trendSpanMs["7d"], "1m")).toBe(11 * 60_000);
    expect(trendBucketMs(trendSpanMs["1y"], "1h")).toBe(9 * 3_600_000);
  });
});

describe("breakGaps", () => {
  it("inserts an empty point where readings stop, so the line is not drawn across the gap", () => {
    const p = (t: number, v: number): TrendPoint => [t, v, v, v];
    const out = breakGaps([p(0, 1), p(10, 2), p(20, 3), p(80, 4), p(90, 5)], 10);
    expect(out).toEqual([p(0, 1), p(10, 2), p(20, 3), [30, null, null, null], p(80, 4), p(90, 5)]);
    expect(breakGaps([], 10)).toEqual([]);
  });
});
