// Alarm evaluation benchmark: the cost per reading of the live alarm engine, against the ingest budget.
// Run: npx tsx lib/bench/events-eval.ts [--readings 1000000] [--compressors 200] [--batch 1000]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { thresholdLimits, thresholdSets } from "@/db/schema";
import { allEffectiveLimits } from "@/db/thresholds";
import { createAlarmEngine } from "@/db/alarm-engine";
import { evaluateSample, finalStageTemperature, initialEvaluatorState, type AlarmSample, type EvaluatorState } from "@/shared/alarm-eval";
import { defaultAlarmSettings, type Limit } from "@/shared/alarm-rules";
import { runStateCode, type ReadingInput } from "@/shared/telemetry";
import seedrandom from "seedrandom";

const { values: flags } = parseArgs({
  options: {
    readings: { type: "string", default: "1000000" },
    compressors: { type: "string", default: "200" },
    batch: { type: "string", default: "1000" },
    "ingest-rate": { type: "string", default: "20000" },
  },
});
const READINGS = Number(flags.readings);
const COMPRESSORS = Number(flags.compressors);
const BATCH = Number(flags.batch);
const INGEST_RATE = Number(flags["ingest-rate"]);

/** Ten limits per model, the shape of a real template. */
const LIMITS: Limit[] = [
  { signal: "finalStageC", direction: "high", priority: "warning", value: 160, deadband: 5, onDelayS: 10, offDelayS: 30 },
  { signal: "finalStageC", direction: "high", priority: "critical", value: 180, deadband: 5, onDelayS: 5, offDelayS: 30 },
  { signal: "stage2C", direction: "high", priority: "warning", value: 170, deadband: 5, onDelayS: 10, offDelayS: 30 },
  { signal: "oilBar", direction: "low", priority: "warning", value: 2.0, deadband: 0.3, onDelayS: 5, offDelayS: 10 },
  { signal: "oilBar", direction: "low", priority: "critical", value: 1.5, deadband: 0.3, onDelayS: 3, offDelayS: 10 },
  { signal: "deliveryBar", direction: "high", priority: "advisory", value: 315, deadband: 3, onDelayS: 30, offDelayS: 30 },
  { signal: "deliveryBar", direction: "high", priority: "critical", value: 340, deadband: 3, onDelayS: 5, offDelayS: 30 },
  { signal: "purifierC", direction: "high", priority: "advisory", value: 45, deadband: 2, onDelayS: 300, offDelayS: 60 },
  { signal: "intakeC", direction: "high", priority: "warning", value: 40, deadband: 2, onDelayS: 120, offDelayS: 60 },
  { signal: "intakeC", direction: "low", priority: "advisory", value: 2, deadband: 1, onDelayS: 600, offDelayS: 300 },
];

function seed(db: Db, n: number, now: number): number[] {
  const s = db.$client;
  const ids: number[] = [];
  s.transaction(() => {
    const site = s.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, 'UTC', ?)");
    const model = s.prepare(
      "INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (?, ?, 250, 330, ?)",
    );
    const comp = s.prepare(
      `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
       VALUES (?, ?, ?, ?, ?, 300, 265, ?, ?)`,
    );
    const sites = Array.from({ length: 10 }, (_, i) => Number(site.run(`Bench site ${i}`, `bench-${i}`, now).lastInsertRowid));
    const models = Array.from({ length: 4 }, (_, i) => Number(model.run(`Bench model ${i}`, 3 + (i % 2), now).lastInsertRowid));
    for (const m of models) {
      for (const l of LIMITS) db.insert(thresholdLimits).values({ scopeType: "model", scopeId: m, ...l, updatedAt: now }).run();
      db.insert(thresholdSets).values({ scopeType: "model", scopeId: m, version: 1, updatedAt: now }).run();
    }
    for (let i = 0; i < n; i++) {
      ids.push(Number(comp.run(sites[i % sites.length]!, models[i % models.length]!, `Bench ${i}`, `B-${i}`, `bench-${i}`, now, now).lastInsertRowid));
    }
  })();
  return ids;
}

type Sim = { id: number; runState: number; final: number; oil: number; delivery: number; hotUntil: number; oilLowUntil: number; stopUntil: number; starts: number };

/** Readings of a normally running fleet with a few excursions (hot stage, low oil, stops), 1 s apart per compressor. */
function makeGenerator(ids: number[], t0: number) {
  const rnd = seedrandom.alea("42");
  const sims: Sim[] = ids.map((id) => ({ id, runState: runStateCode.running, final: 140, oil: 3.5, delivery: 290, hotUntil: 0, oilLowUntil: 0, stopUntil: 0, starts: 10 }));
  let tick = 0;
  let seq = 0;
  let ci = 0;
  return function next(count: number): ReadingInput[] {
    const out: ReadingInput[] = [];
    while (out.length < count) {
      const c = sims[ci]!;
      const r = rnd();
      if (r < 0.00002) c.hotUntil = tick + 200 + Math.floor(rnd() * 300);
      else if (r < 0.00003) c.oilLowUntil = tick + 60 + Math.floor(rnd() * 120);
      else if (r < 0.00006 && tick >= c.stopUntil) {
        c.stopUntil = tick + 120 + Math.floor(rnd() * 600);
        c.starts++;
      }
      c.runState = tick < c.stopUntil ? runStateCode.standby : runStateCode.running;
      const running = c.runState === runStateCode.running;
      const targetFinal = !running ? 30 : tick < c.hotUntil ? 185 : 140;
      c.final += (targetFinal - c.final) * 0.02 + (rnd() - 0.5) * 0.5;
      c.oil = running ? (tick < c.oilLowUntil ? 1.2 : 3.5) + (rnd() - 0.5) * 0.06 : 0;
      c.delivery = Math.min(300, c.delivery + (running ? 0.05 : -0.02)) + (rnd() - 0.5) * 0.4;
      out.push({
        compressorId: c.id,
        ts: t0 + tick * 1000,
        seq: seq++,
        deliveryBar: c.delivery,
        stage1Bar: null,
        stage2Bar: null,
        stage3Bar: null,
        stage4Bar: null,
        stage1C: running ? 110 : 30,
        stage2C: running ? 125 : 30,
        stage3C: c.final,
        stage4C: null,
        oilBar: c.oil,
        purifierC: 28 + (rnd() - 0.5) * 0.3,
        intakeC: 18 + (rnd() - 0.5) * 0.3,
        runState: c.runState,
        motorOn: running ? 1 : 0,
        hourMeterH: 1000,
        starts: c.starts,
        tripCode: null,
      });
      if (++ci === sims.length) {
        ci = 0;
        tick++;
      }
    }
    return out;
  };
}

const cpuOf = (u: NodeJS.CpuUsage) => u.user + u.system;

/** Wall and CPU time per reading: on a busy machine the wall time includes waiting for a core. */
function fmt(wallUs: number, cpuUs: number): string {
  return `${(wallUs / READINGS).toFixed(2)} µs/reading wall, ${(cpuUs / READINGS).toFixed(2)} CPU`;
}

function pct(sorted: number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? Number.NaN;
}

function main(): void {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-bench-alarms-"));
  const db = openDatabase(path.join(dir, "airkeep.db"));
  try {
    runMigrations(db);
    const t0 = Date.UTC(2025, 0, 6, 6);
    const ids = seed(db, COMPRESSORS, t0);
    const limitsPer = (allEffectiveLimits(db).get(ids[0]!) ?? []).length;
    console.log(`alarm evaluation: ${READINGS.toLocaleString("en")} readings, ${COMPRESSORS} compressors, ${limitsPer} limits each, batches of ${BATCH}`);

    // 1. The pure evaluator alone (no engine, no SQLite): the floor.
    {
      const limits = allEffectiveLimits(db);
      const states = new Map<number, EvaluatorState>(ids.map((id) => [id, initialEvaluatorState()]));
      const next = makeGenerator(ids, t0);
      const sample: AlarmSample = { ts: 0, runState: "running", values: {} };
      let ms = 0;
      let cpuUs = 0;
      let events = 0;
      for (let done = 0; done < READINGS; done += BATCH) {
        const batch = next(Math.min(BATCH, READINGS - done));
        const cpu0 = process.cpuUsage();
        const start = performance.now();
        for (const r of batch) {
          sample.ts = r.ts;
          sample.runState = r.runState === runStateCode.running ? "running" : "standby";
          sample.values = {
            deliveryBar: r.deliveryBar,
            finalStageC: finalStageTemperature([r.stage1C, r.stage2C, r.stage3C, r.stage4C]),
            stage2C: r.stage2C,
            oilBar: r.oilBar,
            purifierC: r.purifierC,
            intakeC: r.intakeC,
          };
          events += evaluateSample(states.get(r.compressorId)!, limits.get(r.compressorId)!, sample, defaultAlarmSettings).length;
        }
        ms += performance.now() - start;
        cpuUs += cpuOf(process.cpuUsage(cpu0));
      }
      console.log(`  evaluator only        ${fmt(ms * 1000, cpuUs)}   (${events} raise/clear events)`);
    }

    // 2. The engine, batched as the ingester flushes: evaluation, alarm rows, event log, persisted timers.
    const engine = createAlarmEngine(db, { now: () => t0, log: () => {} });
    const next = makeGenerator(ids, t0);
    const batchMs: number[] = [];
    let transitions = 0;
    let engineCpuUs = 0;
    for (let done = 0; done < READINGS; done += BATCH) {
      const batch = next(Math.min(BATCH, READINGS - done));
      const cpu0 = process.cpuUsage();
      const start = performance.now();
      transitions += engine.onReadings(batch, batch[batch.length - 1]!.ts).length;
      batchMs.push(performance.now() - start);
      engineCpuUs += cpuOf(process.cpuUsage(cpu0));
    }
    const total = batchMs.reduce((a, b) => a + b, 0);
    const perReading = engineCpuUs / READINGS;
    const sorted = [...batchMs].sort((a, b) => a - b);
    const st = engine.stats();
    console.log(`  engine, batched       ${fmt(total * 1000, engineCpuUs)}   (${transitions} alarm transitions, ${st.snapshotsWritten} timer snapshots written)`);
    console.log(`                        per batch of ${BATCH}: p50 ${pct(sorted, 50).toFixed(2)} ms, p99 ${pct(sorted, 99).toFixed(2)} ms, max ${sorted.at(-1)!.toFixed(2)} ms`);

    // 3. One reading at a time (no batching): the worst way to call it.
    {
      const single = Math.min(READINGS, 100_000);
      const more = makeGenerator(ids, t0 + 10 * 86_400_000);
      const rows = more(single);
      const cpu0 = process.cpuUsage();
      const start = performance.now();
      for (const r of rows) engine.onReading(r.compressorId, r, r.ts);
      const ms = performance.now() - start;
      const cpu = cpuOf(process.cpuUsage(cpu0));
      console.log(`  engine, one by one    ${((ms * 1000) / single).toFixed(2)} µs/reading wall, ${(cpu / single).toFixed(2)} CPU   (${single.toLocaleString("en")} readings)`);
    }

    const budgetUs = 1e6 / INGEST_RATE;
    console.log(
      `  at ${INGEST_RATE.toLocaleString("en")} readings/s (the ingest benchmark's rate) the batched engine costs ` +
        `${((perReading * INGEST_RATE) / 1e4).toFixed(1)} % of one core (CPU time), i.e. ${perReading.toFixed(2)} of the ${budgetUs.toFixed(0)} µs each reading may take`,
    );
    console.log(`  (load average while running: ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} on ${os.cpus().length} cores)`);
  } finally {
    db.$client.close();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main();
