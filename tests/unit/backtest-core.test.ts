import { describe, expect, it } from "vitest";
import { U, type RawRow, type RollupRow } from "@/db/backtest-data";
import { createBacktestCore } from "@/lib/backtest/core";
import { evaluateSample, initialEvaluatorState, type AlarmEvent } from "@/shared/alarm-eval";
import type { AlarmSettings, Limit } from "@/shared/alarm-rules";
import { backtestSourceText } from "@/shared/backtest";
import { runStateCode } from "@/shared/telemetry";

const settings: AlarmSettings = { settlingS: 0, reAlarmS: 0, chatterCount: 3, chatterWindowS: 60 };
const warn: Limit = { signal: "deliveryBar", direction: "high", priority: "warning", value: 310, deadband: 2, onDelayS: 3, offDelayS: 2 };
const crit: Limit = { signal: "deliveryBar", direction: "high", priority: "critical", value: 330, deadband: 2, onDelayS: 0, offDelayS: 0 };
const oil: Limit = { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.2, onDelayS: 0, offDelayS: 0 };

const T = Date.UTC(2024, 0, 1);

/** Raw rows as the reader returns them: [ts − base, run state, starts, trip code, deliveryBar, oilBar]. */
function raw(series: [number, number, number][]): RawRow[] {
  return series.map(([s, d, o]) => [s * 1000, runStateCode.running, 7, null, d, o]);
}

describe("backtest core", () => {
  it("counts what evaluateSample raises reading by reading, for both sets, sharing what they share", () => {
    const series: [number, number, number][] = Array.from({ length: 200 }, (_, s) => [s, 300 + 25 * Math.sin(s / 9), s % 50 < 3 ? 1.2 : 3.5]);
    const events: Record<string, AlarmEvent[]> = { old: [], new: [] };
    const core = createBacktestCore({
      stages: 3,
      from: T,
      to: T + 200_000,
      oldLimits: [warn, crit, oil],
      newLimits: [{ ...warn, value: 305 }, crit, oil],
      signals: ["deliveryBar", "oilBar"],
      settings,
      onEvent: (side, e) => events[side]!.push(e),
    });
    for (const r of raw(series)) core.feedRaw(r, T);
    const out = core.finish();

    // The same through the evaluator alone, one full pass per set.
    for (const [side, limits] of [["old", [warn, crit, oil]], ["new", [{ ...warn, value: 305 }, crit, oil]]] as const) {
      const state = initialEvaluatorState();
      const expected = series.flatMap(([s, d, o]) =>
        evaluateSample(state, limits, { ts: T + s * 1000, runState: "running", values: { deliveryBar: d, oilBar: o } }, settings),
      );
      const key = (e: AlarmEvent) => `${e.ts} ${e.kind} ${e.key}`;
      expect(events[side]!.map(key).sort()).toEqual(expected.map(key).sort());
      const result = out[side];
      expect(result.total).toBe(expected.filter((e) => e.kind === "raise").length);
    }
    expect(out.new.raises.warning).toBeGreaterThanOrEqual(out.old.raises.warning);
    expect(out.old.raises.critical).toBe(out.new.raises.critical);
  });

  it("feeds a rollup minute as two samples: its maximum to high limits, its minimum to low limits", () => {
    const core = createBacktestCore({ stages: 3, from: T, to: T + 180_000, oldLimits: [warn, oil], newLimits: [crit], signals: [], settings });
    const bucket = (t: number, dMin: number, dMax: number, oMin: number, oMax: number): RollupRow => {
      const row: RollupRow = new Array(U.signals + 8 * 4).fill(null);
      row[U.bucketTs] = t;
      row[U.lastTs] = t + 59_000;
      row[U.lastRunState] = runStateCode.running;
      row[U.starts] = 7;
      row[U.trippedS] = 0;
      // deliveryBar is signal 0, oilBar signal 5.
      row.splice(U.signals, 4, dMin, dMax, (dMin + dMax) * 30, 60);
      row.splice(U.signals + 5 * 4, 4, oMin, oMax, (oMin + oMax) * 30, 60);
      return row;
    };
    core.feedRollup(bucket(T, 290, 300, 3.4, 3.6));
    core.feedRollup(bucket(T + 60_000, 295, 318, 1.1, 3.6)); // a spike past the warning, a dip under the oil limit
    core.feedRollup(bucket(T + 120_000, 290, 300, 3.4, 3.6));
    const out = core.finish();
    expect(out.old.raises).toEqual({ critical: 1, warning: 1, advisory: 0 });
    // The warning's 3 s on-delay is met within the minute (start and last reading both see the maximum).
    expect(out.old.markers.map((m) => [m.key, m.ts, m.value])).toEqual([
      ["oilBar.low.critical", T + 60_000, 1.1],
      ["deliveryBar.high.warning", T + 119_000, 318],
    ]);
    expect(out.new.total).toBe(0);
    expect(out.samples).toBe(6);
  });

  it("says where the history came from", () => {
    expect(backtestSourceText([{ kind: "raw", from: 0, to: 1, rows: 86_400 }], 30)).toBe(
      "Raw readings (86,400), every one evaluated as the live engine would.",
    );
    expect(backtestSourceText([{ kind: "1m", from: 0, to: 1, rows: 1440 }], 30)).toMatch(/^Only 1-minute rollups \(1,440 minutes\)/);
  });
});
