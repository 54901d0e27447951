// Backtest benchmark: 30 days of one compressor at 1-second resolution (~2.6 M raw readings, written through the
// reading store with their rollups, as the ingester writes them) in a temp database, evaluated with two sets of limits,
// against a bare read of the same rows with the same statement and chunks.
// Targets: backtest < 3 s, and ≤ 1.5 × the bare read measured in the same run.
// Run: npm run bench:backtest [-- --days 30 --runs 3 --keep]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { rawReader } from "@/db/backtest-data";
import { openDatabase, type Db } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { createReadingStore } from "@/db/readings";
import { backtestWindow } from "@/lib/backtest/run";
import { alarmSignals, type Limit } from "@/shared/alarm-rules";
import { runStateCode, type ReadingInput } from "@/shared/telemetry";
import seedrandom from "seedrandom";

const { values: flags } = parseArgs({
  options: {
    days: { type: "string", default: "30" },
    runs: { type: "string", default: "3" },
    chunk: { type: "string", default: "20000" },
    keep: { type: "boolean", default: false },
    /** A database kept by an earlier --keep run: skips generating the readings again. */
    reuse: { type: "string" },
  },
});
const DAYS = Number(flags.days);
const RUNS = Math.max(1, Number(flags.runs));
const CHUNK = Number(flags.chunk);

/** Ten limits, the shape of a real template; the proposal lowers the final-stage warning by 10 K. */
const OLD: Limit[] = [
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
const NEW: Limit[] = OLD.map((l) => (l.signal === "finalStageC" && l.priority === "warning" ? { ...l, value: 150 } : l));

function seedDb(db: Db, from: number, n: number): number {
  const s = db.$client;
  s.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES ('Bench site', 'bench', 'UTC', ?)").run(from);
  s.prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Bench 3', 3, 250, 330, ?)").run(from);
  const id = Number(
    s
      .prepare(
        `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
         VALUES (1, 1, 'Bench unit', 'B-1', 'bench-1', 300, 265, ?, ?)`,
      )
      .run(from, from).lastInsertRowid,
  );
  // Written as the ingester writes them: raw rows with their 1-minute and 1-hour rollups.
  const store = createReadingStore(db);
  const rnd = seedrandom.alea("42");
  // A bank-charging duty cycle: runs ~25 min, stands ~35 min; a hot spell each afternoon, an oil dip now and then.
  let running = false;
  let phaseLeft = 0;
  let starts = 1000;
  let delivery = 280;
  let fin = 40;
  let hour = 5000;
  const batch = 10_000;
  for (let i = 0; i < n; i += batch) {
    const rows: ReadingInput[] = [];
    for (let k = i; k < Math.min(n, i + batch); k++) {
      const ts = from + k * 1000;
      if (phaseLeft-- <= 0) {
        running = !running;
        if (running) starts++;
        phaseLeft = running ? 1200 + Math.floor(rnd() * 600) : 1800 + Math.floor(rnd() * 600);
      }
      const dayS = (k % 86_400) / 86_400;
      const hot = dayS > 0.55 && dayS < 0.62 ? 22 : 0;
      const target = running ? 140 + hot + (rnd() - 0.5) * 4 : 30;
      fin += (target - fin) * 0.01;
      delivery = running ? Math.min(345, delivery + 0.03) : Math.max(260, delivery - 0.01);
      const oil = running ? (k % 50_000 < 40 ? 1.2 : 3.6 + (rnd() - 0.5) * 0.2) : 0;
      if (running) hour += 1 / 3600;
      rows.push({
        compressorId: id,
        ts,
        seq: k,
        deliveryBar: delivery,
        stage1Bar: null,
        stage2Bar: null,
        stage3Bar: null,
        stage4Bar: null,
        stage1C: fin * 0.8,
        stage2C: fin * 0.9,
        stage3C: fin,
        stage4C: null,
        oilBar: oil,
        purifierC: 25 + hot / 2,
        intakeC: 18 + hot / 3,
        runState: running ? runStateCode.running : runStateCode.standby,
        motorOn: running ? 1 : 0,
        hourMeterH: hour,
        starts,
        tripCode: null,
      });
    }
    store.insert(rows);
  }
  return id;
}

function fmtMs(ms: number): string {
  return `${(ms / 1000).toFixed(2)} s`;
}

const reuse = flags.reuse && fs.existsSync(flags.reuse) ? flags.reuse : null;
const dir = reuse ? path.dirname(reuse) : fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-bench-backtest-"));
const file = reuse ?? path.join(dir, "bench.db");
const db = openDatabase(file);
runMigrations(db);
const n = Math.round(DAYS * 86_400);
const to = Date.UTC(2024, 6, 1);
const from = to - n * 1000;

const t = performance.now();
let id = 1;
if (!reuse) {
  id = seedDb(db, from, n);
  console.log(`generated ${n.toLocaleString("en-GB")} readings (${DAYS} d at 1 s) in ${fmtMs(performance.now() - t)}; ${(fs.statSync(file).size / 1e6).toFixed(0)} MB`);
} else console.log(`reusing ${file}`);

const SIGNALS = alarmSignals.filter((s) => OLD.some((l) => l.signal === s));

type Timing = { ms: number; cpuMs: number };
function timed<T>(fn: () => Promise<T>): Promise<Timing & { value: T }> {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  return fn().then((value) => {
    const c = process.cpuUsage(c0);
    return { ms: performance.now() - t0, cpuMs: (c.user + c.system) / 1000, value };
  });
}

/** The same rows, columns, statement and chunks as the backtest reads, touched and thrown away. */
async function bareRead(signals: readonly (typeof alarmSignals)[number][]): Promise<number> {
  const reader = rawReader(db, id, 3, signals);
  let rows = 0;
  let sink = 0;
  let cursor = from;
  for (;;) {
    const chunk = reader.chunk(cursor, to, CHUNK);
    for (let i = 0; i < chunk.length; i++) sink += chunk[i]![1] as number;
    rows += chunk.length;
    if (chunk.length < CHUNK) break;
    cursor += (chunk[chunk.length - 1]![0] as number) + 1;
    await new Promise<void>((resolve) => setImmediate(resolve));
  }
  if (sink < 0) console.log(sink);
  return rows;
}

async function backtest() {
  return backtestWindow(db, {
    compressorId: id,
    stages: 3,
    from,
    to,
    oldLimits: OLD,
    newLimits: NEW,
    chartSignals: SIGNALS,
    chunkRows: CHUNK,
  });
}

// Warm the page cache and the JIT once, then alternate the two so neither gets a warmer cache.
await bareRead(SIGNALS);
await backtest();
const bare: Timing[] = [];
const bt: Timing[] = [];
let res: Awaited<ReturnType<typeof backtest>> | null = null;
for (let i = 0; i < RUNS; i++) {
  bare.push(await timed(() => bareRead(SIGNALS)));
  const x = await timed(backtest);
  bt.push(x);
  res = x.value;
}
const full = await timed(() => bareRead(alarmSignals));
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const bareMs = median(bare.map((x) => x.ms));
const btMs = median(bt.map((x) => x.ms));
const bareCpu = median(bare.map((x) => x.cpuMs));
const btCpu = median(bt.map((x) => x.cpuMs));
const ratio = btMs / bareMs;
const r = res!;
const load = os.loadavg()[0]!.toFixed(1);
console.log(`machine        ${os.cpus().length} CPUs, load average ${load} at the end of the runs`);
console.log(
  `bare read      ${fmtMs(bareMs)} wall, ${fmtMs(bareCpu)} CPU  (${SIGNALS.length} signal columns + time, state, starts, trip; runs ${bare.map((x) => fmtMs(x.ms)).join(", ")}; ${Math.round(n / (bareMs / 1000)).toLocaleString("en-GB")} rows/s)`,
);
console.log(
  `backtest       ${fmtMs(btMs)} wall, ${fmtMs(btCpu)} CPU  (runs ${bt.map((x) => fmtMs(x.ms)).join(", ")}; ${r.samples.toLocaleString("en-GB")} samples, 2 sets × ${OLD.length} limits, ${OLD.filter((l, i) => l !== NEW[i]).length} differing)`,
);
console.log(`ratio          ${ratio.toFixed(2)} × bare read (wall), ${(btCpu / bareCpu).toFixed(2)} × (CPU)`);
console.log(`all columns    ${fmtMs(full.ms)} wall, ${fmtMs(full.cpuMs)} CPU to read every signal column of the same rows`);
console.log(
  `alarms         in force ${r.old.total} (critical ${r.old.raises.critical}, warning ${r.old.raises.warning}, advisory ${r.old.raises.advisory}); ` +
    `proposed ${r.new.total} (critical ${r.new.raises.critical}, warning ${r.new.raises.warning}, advisory ${r.new.raises.advisory})`,
);
console.log(`sources        ${r.sources.map((s) => `${s.kind} ${s.rows.toLocaleString("en-GB")}`).join(", ")}`);
const ok = btMs < 3000 && ratio <= 1.5;
console.log(`targets        backtest < 3 s: ${btMs < 3000 ? "met" : "MISSED"}; ≤ 1.5 × bare read: ${ratio <= 1.5 ? "met" : "MISSED"}`);
db.$client.close();
if (!flags.keep && !reuse) fs.rmSync(dir, { recursive: true, force: true });
else console.log(`kept ${file}`);
process.exitCode = ok ? 0 : 1;
