import { afterEach, beforeEach, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { createReadingStore } from "@/db/readings";
import { backtestWindow, BacktestRefusal, runBacktest, warmupMs } from "@/lib/backtest/run";
import type { AlarmSettings, Limit } from "@/shared/alarm-rules";
import { backtestSourceText } from "@/shared/backtest";
import { at, makeTempDb, reading, seedFleet, T0, type Fleet, type TempDb } from "./alarms-fixtures";

let t: TempDb;
let db: Db;
let fleet: Fleet;
beforeEach(() => {
  t = makeTempDb("airkeep-backtest-window-");
  db = t.db;
  fleet = seedFleet(db);
});
afterEach(() => t.cleanup());

const settings: AlarmSettings = { settlingS: 60, reAlarmS: 0, chatterCount: 3, chatterWindowS: 60 };
const hot: Limit = { signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 0, offDelayS: 0 };
const hotter: Limit = { ...hot, value: 150 };
const oilLow: Limit = { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 0, offDelayS: 0 };

describe("where history comes from", () => {
  it("raw readings where kept, 1-minute rollups before them; a rollup minute feeds its max to high limits and its min to low", async () => {
    const store = createReadingStore(db);
    // Two hours running at 140 °C, 3.5 bar; raw readings kept for the second hour only (the first was pruned).
    const rows = Array.from({ length: 7200 }, (_, s) => reading(fleet.c1, s));
    // In the first hour: a 3-second spike to 170 °C at 40 min and a 2-second oil dip to 1.0 bar at 45 min.
    for (let s = 2400; s < 2403; s++) rows[s] = reading(fleet.c1, s, { finalC: 170 });
    for (let s = 2700; s < 2702; s++) rows[s] = reading(fleet.c1, s, { oilBar: 1.0 });
    // In the second hour, raw: the same spike at 100 min.
    for (let s = 6000; s < 6003; s++) rows[s] = reading(fleet.c1, s, { finalC: 170 });
    store.insert(rows.slice(0, 3600), { keepRaw: false });
    store.insert(rows.slice(3600));

    const r = await backtestWindow(db, { compressorId: fleet.c1, stages: 3, from: at(600), to: at(7200), oldLimits: [hot, oilLow], newLimits: [hotter, oilLow], settings, chartSignals: ["finalStageC"] });
    expect(r.sources.map((s) => [s.kind, s.from, s.to, s.rows])).toEqual([
      ["1m", at(600), at(3600), 50],
      ["raw", at(3600), at(7200), 3600],
    ]);
    expect(r.old.byLimit.map((x) => [x.key, x.raises])).toEqual([
      ["finalStageC.high.warning", 2],
      ["oilBar.low.critical", 1],
    ]);
    // From rollups the spike's minute counts as a whole minute beyond the limit (start and last reading).
    const fromRollup = r.old.markers.find((m) => m.key === "finalStageC.high.warning")!;
    expect(fromRollup).toMatchObject({ ts: at(2400), value: 170 });
    const raw = r.old.markers.filter((m) => m.key === "finalStageC.high.warning")[1]!;
    expect(raw).toMatchObject({ ts: at(6000), value: 170 });
    expect(backtestSourceText(r.sources, 30)).toMatch(/^Raw readings \(3,600\) and 1-minute rollups \(50 minutes\) where raw readings are no longer kept/);
    expect(backtestSourceText(r.sources, 30)).toMatch(/high limits see the minute's maximum and low limits its minimum/);
    // The chart has the mean, min and max per bucket over the whole window.
    const points = r.chart.series.finalStageC!;
    expect(points[0]![0]).toBe(at(600));
    expect(Math.max(...points.map((p) => p[3] ?? -Infinity))).toBe(170);
  });

  it("says so when the window has no history", async () => {
    const r = await backtestWindow(db, { compressorId: fleet.c1, stages: 3, from: at(0), to: at(3600), oldLimits: [hot], newLimits: [hotter], settings });
    expect(r.sources).toEqual([]);
    expect(backtestSourceText(r.sources, 30)).toBe("No stored history in this window.");
  });
});

describe("what is counted", () => {
  function store(series: [number, number][]) {
    const s = createReadingStore(db);
    s.insert(series.map(([sec, finalC]) => reading(fleet.c1, sec, { finalC })));
  }

  it("alarms per priority, time in alarm, chattering; the warm-up brings state but counts nothing", async () => {
    const series: [number, number][] = [];
    for (let s = 0; s < 600; s++) {
      // Running from 0; hot from 200 s (before the window) to 320 s; then three short excursions 20 s apart.
      const v = (s >= 200 && s < 320) || s === 400 || s === 420 || s === 440 ? 165 : 140;
      series.push([s, v]);
    }
    store(series);
    const from = at(300);
    // The warm-up (settling + longest delay + chatter window + a minute) starts at 120 s: settled by 180 s.
    expect(from - warmupMs(settings, [hot])).toBe(at(120));
    const r = await backtestWindow(db, { compressorId: fleet.c1, stages: 3, from, to: at(600), oldLimits: [hot], newLimits: [hot], settings });
    expect(r.old.activeAtStart).toEqual(["finalStageC.high.warning"]);
    // Raised at 200 s (before the window): not counted; cleared at 320 s: 20 s of it inside the window.
    expect(r.old.raises).toEqual({ critical: 0, warning: 3, advisory: 0 });
    expect(r.old.timeInAlarmMs.warning).toBe(20_000 + 3 * 1000);
    expect(r.old.chatteringRaises).toBe(1);
    expect(r.old.chatteringLimits).toEqual(["finalStageC.high.warning"]);
    expect(r.old.activeAtEnd).toEqual([]);
    expect(r.new).toEqual(r.old);
    expect(r.samples).toBe(480); // from the warm-up on
  });

  it("an alarm still active at the end counts until the end of the window", async () => {
    store(Array.from({ length: 200 }, (_, s): [number, number] => [s, s >= 150 ? 165 : s >= 100 ? 155 : 140]));
    const r = await backtestWindow(db, { compressorId: fleet.c1, stages: 3, from: at(0), to: at(300), oldLimits: [hot], newLimits: [hotter], settings });
    expect(r.old.activeAtEnd).toEqual(["finalStageC.high.warning"]);
    expect(r.old.timeInAlarmMs.warning).toBe(150_000);
    // The lowered warning (150 °C) is already crossed at 155 °C from 100 s: one longer alarm.
    expect(r.new.raises.warning).toBe(1);
    expect(r.new.timeInAlarmMs.warning).toBe(200_000);
    expect(r.new.activeAtEnd).toEqual(["finalStageC.high.warning"]);
  });
});

describe("the page's backtest", () => {
  it("compares the limits in force with the set as proposed, for a template or a compressor", async () => {
    const s = createReadingStore(db);
    const now = T0 + 3_600_000;
    s.insert(Array.from({ length: 900 }, (_, i) => reading(fleet.c1, 2700 + i, { finalC: 155 })));
    const rows = [
      { signal: "finalStageC", direction: "high", priority: "warning", value: 150, deadband: 5, onDelayS: 10, offDelayS: 5, enabled: true },
      { signal: "finalStageC", direction: "high", priority: "critical", value: 180, deadband: 5, onDelayS: 0, offDelayS: 0, enabled: true },
    ] as const;
    const model = await runBacktest(db, { compressorId: fleet.c1, span: "24h", scopeType: "model", scopeId: fleet.modelId, limits: [...rows] }, { now, settings });
    expect(model.old.total).toBe(0);
    expect(model.new.raises.warning).toBe(1);
    expect(model.compressorName).toBe("HR-1 Bay compressor");
    expect(model.timeZone).toBe("Europe/Oslo");
    // The template's other limits are gone from the proposal (it is the whole set).
    expect(model.new.limits).toHaveLength(2);

    const own = await runBacktest(db, { compressorId: fleet.c1, span: "24h", scopeType: "compressor", scopeId: fleet.c1, limits: [rows[0]] }, { now, settings });
    expect(own.new.limits.length).toBe(4);
    expect(own.new.raises.warning).toBe(1);

    await expect(runBacktest(db, { compressorId: fleet.c1, span: "24h", scopeType: "compressor", scopeId: fleet.c2, limits: [] })).rejects.toThrow(BacktestRefusal);
    await expect(runBacktest(db, { compressorId: fleet.c1, span: "24h", scopeType: "model", scopeId: 999, limits: [] })).rejects.toThrow(/Choose a compressor of this model/);
    await expect(runBacktest(db, { compressorId: 999, span: "24h", scopeType: "model", scopeId: fleet.modelId, limits: [] })).rejects.toThrow(/No such compressor/);
  });

  it("stops when the request goes away", async () => {
    createReadingStore(db).insert(Array.from({ length: 3000 }, (_, i) => reading(fleet.c1, i)));
    const ctl = new AbortController();
    ctl.abort(new Error("gone"));
    const run = backtestWindow(db, { compressorId: fleet.c1, stages: 3, from: at(0), to: at(3000), oldLimits: [hot], newLimits: [hotter], settings, signal: ctl.signal });
    await expect(run).rejects.toThrow("gone");
  });
});
