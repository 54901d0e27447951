import { afterEach, describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { effectiveLimits } from "@/db/thresholds";
import { createAlarmEngine, type AlarmTransition } from "@/db/alarm-engine";
import { backtestWindow } from "@/lib/backtest/run";
import type { AlarmEvent } from "@/shared/alarm-eval";
import { alarmSignals, priorities, type AlarmSettings, type AlarmSignal, type Limit, type Priority } from "@/shared/alarm-rules";
import { checkSet, signalRange, thresholdRowSchema, type ThresholdRow } from "@/shared/threshold-schema";
import { runStateCode, type ReadingInput, type RunState } from "@/shared/telemetry";
import { feed, makeTempDb, setLimits, type TempDb } from "./alarms-fixtures";
import seedrandom from "seedrandom";

// Property: for random reading series and random valid limits (seeded, so a failure replays), the backtest of the
// window raises and clears exactly what the live alarm engine raises and clears when the same readings are stored and
// replayed through createAlarmEngine(...).onReadings on a real SQLite file — for the set in force and the proposed
// set alike, trips included, to the millisecond.

type Rnd = () => number;
const pick = <T,>(r: Rnd, xs: readonly T[]): T => xs[Math.floor(r() * xs.length)]!;
const between = (r: Rnd, lo: number, hi: number) => lo + r() * (hi - lo);
const round1 = (x: number) => Math.round(x * 10) / 10;

/** A unit's life: run/stop cycles, data gaps, restarts between readings, trips, missing sensors, excursions and noise. */
function series(r: Rnd, compressorIds: number[], stages: number, t0: number, n: number): ReadingInput[][] {
  const out: ReadingInput[][] = compressorIds.map(() => []);
  let ts = t0;
  let state: RunState = pick(r, ["running", "standby", "stopped"] as const);
  let starts = 100;
  const level: Record<string, number> = { delivery: 250, fin: 140, oil: 3.5, purifier: 30, intake: 15 };
  const excursion: Record<string, number> = { delivery: 0, fin: 0, oil: 0, purifier: 0, intake: 0 };
  for (let i = 0; i < n; i++) {
    const gap = r() < 0.85 ? 1000 : r() < 0.8 ? Math.round(between(r, 2, 30)) * 1000 : Math.round(between(r, 60, 400)) * 1000;
    ts += gap + (r() < 0.1 ? Math.floor(r() * 999) : 0);
    // Run state as a small Markov chain; a trip now and then; a restart hidden in a data gap.
    const u = r();
    if (state === "running") state = u < 0.015 ? "standby" : u < 0.02 ? "stopped" : u < 0.024 ? "tripped" : "running";
    else if (state === "starting") state = u < 0.5 ? "running" : "starting";
    else if (state === "tripped") state = u < 0.1 ? "stopped" : "tripped";
    else state = u < 0.04 ? "starting" : u < 0.06 ? "running" : state;
    if (state === "starting" || (state === "running" && r() < 0.01)) starts++;
    for (const k of Object.keys(level)) {
      if (r() < 0.02) excursion[k] = (r() - 0.3) * (k === "oil" ? 3 : k === "delivery" ? 80 : 60);
      excursion[k] = excursion[k]! * 0.97;
    }
    const running = state === "running";
    const noise = () => (r() - 0.5) * 2;
    const fin = round1(level.fin! * (running ? 1 : 0.3) + excursion.fin! + noise());
    const stageC = Array.from({ length: 4 }, (_, s) => (s < stages ? round1(fin * (0.7 + 0.1 * s)) : null));
    if (stages > 1 && r() < 0.03) stageC[stages - 1] = null; // final-stage sensor missing: the stage below stands in
    const values = {
      deliveryBar: round1(level.delivery! + excursion.delivery! + noise() * 2),
      oilBar: r() < 0.02 ? null : Math.round((running ? level.oil! + excursion.oil! / 2 + noise() * 0.1 : 0.2) * 100) / 100,
      purifierC: round1(level.purifier! + excursion.purifier! / 3 + noise()),
      intakeC: r() < 0.01 ? null : round1(level.intake! + excursion.intake! / 4 + noise()),
    };
    compressorIds.forEach((id, k) => {
      out[k]!.push({
        compressorId: id,
        ts,
        seq: i,
        deliveryBar: values.deliveryBar,
        stage1Bar: null,
        stage2Bar: null,
        stage3Bar: null,
        stage4Bar: null,
        stage1C: stageC[0]!,
        stage2C: stageC[1] ?? null,
        stage3C: stageC[2] ?? null,
        stage4C: stageC[3] ?? null,
        oilBar: values.oilBar,
        purifierC: values.purifierC,
        intakeC: values.intakeC,
        runState: runStateCode[state],
        motorOn: running ? 1 : 0,
        hourMeterH: 1000 + i / 3600,
        starts: r() < 0.02 ? null : starts,
        tripCode: state === "tripped" ? 110 : null,
      });
    });
  }
  return out;
}

const signalValue = (x: ReadingInput, s: AlarmSignal, stages: number): number | null => {
  if (s === "finalStageC") {
    const st = [x.stage1C, x.stage2C, x.stage3C, x.stage4C].slice(0, stages);
    for (let i = st.length - 1; i >= 0; i--) if (st[i] != null) return st[i]!;
    return null;
  }
  return (x as unknown as Record<string, number | null>)[s] ?? null;
};

/** Random limits that pass the shared schema: values drawn from the series itself, so they are crossed. */
function randomLimits(r: Rnd, readings: ReadingInput[], stages: number): Limit[] {
  const signals = alarmSignals.filter((s) => !/^stage[1-4]C$/.test(s) || Number(s[5]) <= stages);
  const chosen = signals.filter(() => r() < 0.45);
  if (chosen.length === 0) chosen.push(pick(r, signals));
  const rows: ThresholdRow[] = [];
  for (const signal of chosen) {
    const vals = readings.map((x) => signalValue(x, signal, stages)).filter((v): v is number => v != null).sort((a, b) => a - b);
    if (vals.length < 10) continue;
    const q = (p: number) => vals[Math.min(vals.length - 1, Math.floor(p * vals.length))]!;
    for (const direction of ["high", "low"] as const) {
      if (r() < 0.35) continue;
      const ps = priorities.filter(() => r() < 0.6);
      if (ps.length === 0) ps.push(pick(r, priorities));
      // Severity order: advisory nearest normal, critical furthest.
      const ordered = (["advisory", "warning", "critical"] as Priority[]).filter((p) => ps.includes(p));
      const quantiles = ordered.map((_, k) => (direction === "high" ? 0.7 + 0.1 * k + r() * 0.05 : 0.3 - 0.1 * k - r() * 0.05));
      const values = quantiles.map((p) => q(p) + (r() < 0.3 ? 0 : round1(between(r, -0.5, 0.5))));
      ordered.forEach((priority, k) => {
        const value = values[k]!;
        const range = signalRange[signal];
        if (value < range.min || value > range.max) return;
        rows.push({
          signal,
          direction,
          priority,
          value,
          deadband: pick(r, [0, 0, 0.1, 0.5, 1, 2, 5]),
          onDelayS: pick(r, [0, 0, 1, 2, 5, 10, 30, 60]),
          offDelayS: pick(r, [0, 0, 1, 3, 5, 20, 60]),
          enabled: true,
        });
      });
    }
  }
  // Keep only a set the shared schema accepts: drop the rows it objects to until none is left objecting.
  for (let guard = 0; guard < 50; guard++) {
    const bad = new Set(checkSet(rows, { scopeType: "model" }).map((i) => i.path[1] as number));
    rows.forEach((row, i) => {
      if (!thresholdRowSchema().safeParse(row).success) bad.add(i);
    });
    if (bad.size === 0) break;
    const first = [...bad].sort((a, b) => a - b)[0]!;
    if (rows[first]!.deadband > 0) rows[first]!.deadband = 0;
    else rows.splice(first, 1);
  }
  expect(checkSet(rows, { scopeType: "model" })).toEqual([]);
  return rows.map(({ enabled: _e, ...l }) => l);
}

type Seen = { kind: "raise" | "clear"; key: string; ts: number };
const byTime = (a: Seen, b: Seen) => a.ts - b.ts || a.key.localeCompare(b.key) || a.kind.localeCompare(b.kind);

function fromEngine(ts: readonly AlarmTransition[], compressorId: number): Seen[] {
  return ts
    .filter((t) => t.compressorId === compressorId && (t.action === "alarm.raise" || t.action === "alarm.clear" || t.action === "alarm.suppress"))
    .map((t) => ({ kind: t.action === "alarm.raise" ? ("raise" as const) : ("clear" as const), key: t.key, ts: t.ts }))
    .sort(byTime);
}

let t: TempDb | null = null;
afterEach(() => t?.cleanup());

function seed(db: Db, stages: number, now: number): { a: number; b: number; modelA: number; modelB: number } {
  const s = db.$client;
  s.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES ('Site', 'site', 'UTC', ?)").run(now);
  const model = s.prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (?, ?, 250, 330, ?)");
  const modelA = Number(model.run("Model A", stages, now).lastInsertRowid);
  const modelB = Number(model.run("Model B", stages, now).lastInsertRowid);
  const comp = s.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
     VALUES (1, ?, ?, ?, ?, 300, 265, ?, ?)`,
  );
  const a = Number(comp.run(modelA, "Unit A", "S-A", "unit-a", now, now).lastInsertRowid);
  const b = Number(comp.run(modelB, "Unit B", "S-B", "unit-b", now, now).lastInsertRowid);
  return { a, b, modelA, modelB };
}

describe("the backtest raises what the live engine raises", () => {
  const CASES = 24;
  for (let c = 0; c < CASES; c++) {
    const seedValue = 0x5eed + c * 7919;
    it(`random series and limits #${c} (seed ${seedValue})`, async () => {
      const r = seedrandom.alea(String(seedValue));
      t = makeTempDb("airkeep-backtest-");
      const db = t.db;
      const t0 = Date.UTC(2024, 4, 1, 6, 0, 0) + Math.floor(r() * 3_600_000);
      const stages = 1 + Math.floor(r() * 4);
      const ids = seed(db, stages, t0 - 86_400_000);
      const [rowsA, rowsB] = series(r, [ids.a, ids.b], stages, t0, 400 + Math.floor(r() * 1400));
      const limitsA = randomLimits(r, rowsA!, stages);
      const limitsB = r() < 0.3 ? limitsA.map((l) => (r() < 0.5 ? { ...l, value: round1(l.value + (r() - 0.5) * 4) } : l)) : randomLimits(r, rowsA!, stages);
      // A proposal that breaks the ordering rules is not one the editor would run; fall back to the first set.
      const proposed = checkSet(limitsB.map((l) => ({ ...l, enabled: true })), { scopeType: "model" }).length ? limitsA : limitsB;
      setLimits(db, "model", ids.modelA, limitsA, t0 - 86_400_000);
      setLimits(db, "model", ids.modelB, proposed, t0 - 86_400_000);
      const settings: AlarmSettings = {
        settlingS: pick(r, [0, 5, 30, 60, 120]),
        reAlarmS: 0,
        chatterCount: 2 + Math.floor(r() * 3),
        chatterWindowS: pick(r, [10, 30, 60, 120]),
      };

      // The live engine: readings stored and evaluated batch by batch, in the transaction that stores them.
      const engine = createAlarmEngine(db, { settings, now: () => t0, log: () => {} });
      const transitions: AlarmTransition[] = [];
      for (let i = 0; i < rowsA!.length; ) {
        const k = 1 + Math.floor(r() * 40);
        const batch = [...rowsA!.slice(i, i + k), ...rowsB!.slice(i, i + k)];
        transitions.push(...feed(db, engine, batch));
        i += k;
      }

      // The backtest of the same window from the stored readings, in odd-sized chunks.
      const events: Record<"old" | "new", Seen[]> = { old: [], new: [] };
      const last = rowsA!.at(-1)!.ts;
      const result = await backtestWindow(db, {
        compressorId: ids.a,
        stages,
        from: t0,
        to: last + 1,
        oldLimits: effectiveLimits(db, ids.a),
        newLimits: effectiveLimits(db, ids.b),
        settings,
        chunkRows: 5 + Math.floor(r() * 300),
        // Stretches summed up in SQLite, of every length from a few readings to most of the series (or adaptive).
        blockMs: pick(r, [undefined, 3_000, 10_000, 30_000, 120_000, 600_000]),
        // Whole minutes judged from their summaries first, or every stretch summed up from the readings.
        minuteSummaries: r() < 0.7,
        onEvent: (side, e: AlarmEvent) => events[side].push({ kind: e.kind, key: e.key, ts: e.ts }),
      });

      const engineA = fromEngine(transitions, ids.a);
      const engineB = fromEngine(transitions, ids.b);
      expect(events.old.sort(byTime)).toEqual(engineA);
      expect(events.new.sort(byTime)).toEqual(engineB);

      // And the counts on screen are those raises, per priority.
      const count = (seen: Seen[], p: Priority, limits: Limit[]) =>
        seen.filter((e) => e.kind === "raise" && e.key !== "trip" && limits.find((l) => `${l.signal}.${l.direction}.${l.priority}` === e.key)?.priority === p).length;
      for (const p of priorities) {
        expect(result.old.raises[p]).toBe(count(engineA, p, limitsA));
        expect(result.new.raises[p]).toBe(count(engineB, p, proposed));
      }
      expect(result.trips).toBe(engineA.filter((e) => e.kind === "raise" && e.key === "trip").length);
      expect(result.samples).toBe(rowsA!.length);
      expect(result.sources).toEqual([{ kind: "raw", from: rowsA![0]!.ts, to: last + 1, rows: rowsA!.length }]);
    });
  }
});
