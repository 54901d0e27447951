// Purifier benchmark: cartridge use for 500 compressors from a year of rollups. The year is written as 1-hour rollups
// (8 760 a compressor, 4.4 M rows) — what the cartridge sum reads; a year of 1-minute rollups for 500 units would be
// 263 M rows (~20 GB), beyond this machine's disk budget. Times the first full sum (everything since the last change),
// then the incremental update after one more hour, and splits each into SQLite reads and the water computation.
// Run: npx tsx lib/bench/purifier.ts [--units 500] [--keep]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { airUnits, cartridgeUsages, effectiveRatings, purifierTimings, saveRating, specFor } from "@/db/air-quality";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { airQualityOverview } from "@/lib/air-quality/service";
import { HOUR_MS } from "@/shared/purifier";

const { values: args } = parseArgs({ options: { units: { type: "string", default: "500" }, keep: { type: "boolean", default: false } } });
const UNITS = Number(args.units);
const HOURS = 365 * 24;

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-purifier-bench-"));
const db = openDatabase(path.join(dir, "airkeep.db"));
runMigrations(db);
const sql = db.$client;
const end = Date.UTC(2026, 0, 1);
const start = end - HOURS * HOUR_MS;

sql.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (1, 'Bench site', 'bench', 'Europe/London', 0)").run();
sql.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'Bench 4-stage', 4, 320, 350, 0)").run();
const comp = sql.prepare(
  "INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, 1, 1, ?, ?, ?, 330, 290, 0, 0)",
);
for (let id = 1; id <= UNITS; id++) comp.run(id, `B-${id}`, `BENCH-${id}`, `bench-${id}`);
saveRating(db, { scopeType: "model", scopeId: 1, rating: { kind: "water-g", value: 5000, refBar: 200, refC: 20, advisoryPct: 80 } }, 0);

// Written by SQLite itself (a recursive CTE per compressor): a year of hourly buckets with a seasonal purifier
// temperature, a 30 % duty and deterministic pseudo-random spread; a third of the fleet reports purifierBar.
const t0 = performance.now();
const fill = sql.prepare(
  `WITH RECURSIVE h(i) AS (SELECT 0 UNION ALL SELECT i + 1 FROM h WHERE i + 1 < $hours),
   v AS (SELECT i, ((i * 2654435761 + $id * 40503) % 1000003) / 1000003.0 AS r FROM h)
   INSERT INTO readings_1h (compressor_id, bucket_ts, n, run_s, covered_s, purifier_c_sum, purifier_c_n, delivery_bar_sum, delivery_bar_n, purifier_bar_sum, purifier_bar_n)
   SELECT $id, $start + i * 3600000, 3600, CASE WHEN r < 0.3 THEN CAST(r / 0.3 * 3600 AS INTEGER) ELSE 0 END, 3600,
          (22 + 8 * sin(2 * 3.141592653589793 * i / $hours) + 6 * r) * 3600, 3600, (250 + 80 * r) * 3600, 3600,
          CASE WHEN $id % 3 = 0 THEN 280 * 3600 ELSE 0 END, CASE WHEN $id % 3 = 0 THEN 3600 ELSE 0 END
   FROM v`,
);
sql.transaction(() => {
  for (let id = 1; id <= UNITS; id++) fill.run({ id, start, hours: HOURS });
})();
const ins = sql.prepare(
  `INSERT INTO readings_1h (compressor_id, bucket_ts, n, run_s, covered_s, purifier_c_sum, purifier_c_n, delivery_bar_sum, delivery_bar_n, purifier_bar_sum, purifier_bar_n)
   VALUES (?, ?, 3600, ?, 3600, ?, 3600, ?, 3600, ?, ?)`,
);
const writeS = (performance.now() - t0) / 1000;
console.log(`wrote ${(UNITS * HOURS).toLocaleString("en-GB")} 1-hour rollup rows for ${UNITS} compressors in ${writeS.toFixed(1)} s`);
sql.pragma("wal_checkpoint(TRUNCATE)");

const units = airUnits(db, null);
const rating = effectiveRatings(db);
const items = units.map((u) => ({ unit: u, spec: specFor(u, rating(u)!) }));

function pass(label: string, now: number) {
  purifierTimings.sqlMs = purifierTimings.computeMs = purifierTimings.rows = 0;
  const t = performance.now();
  let water = 0;
  for (const { usage } of cartridgeUsages(db, items, now).values()) water += usage.waterG;
  const ms = performance.now() - t;
  const other = ms - purifierTimings.sqlMs - purifierTimings.computeMs;
  console.log(
    `${label}: ${ms.toFixed(0)} ms for ${units.length} compressors, ${purifierTimings.rows.toLocaleString("en-GB")} buckets read — ` +
      `SQLite reads ${purifierTimings.sqlMs.toFixed(0)} ms (${((100 * purifierTimings.sqlMs) / ms).toFixed(0)} %), ` +
      `water computation ${purifierTimings.computeMs.toFixed(0)} ms (${((100 * purifierTimings.computeMs) / ms).toFixed(0)} %), ` +
      `bookkeeping/writes ${other.toFixed(0)} ms; mean water ${(water / units.length).toFixed(0)} g`,
  );
  return ms;
}

pass("first full sum (a year)", end);
// one more hour for every compressor, then the incremental update
for (let id = 1; id <= UNITS; id++) ins.run(id, end, 1800, 25 * 3600, 290 * 3600, 0, 0);
pass("incremental update (+1 hour)", end + HOUR_MS);
pass("no new complete hour", end + HOUR_MS + 60_000);
const t = performance.now();
airQualityOverview(db, null, end + HOUR_MS + 60_000);
console.log(`/air-quality overview (cartridge sums, 30-day duty for predictions, due dates): ${(performance.now() - t).toFixed(0)} ms`);
console.log("(measured on a shared 2-core machine while other work ran: noisy)");

db.$client.close();
if (!args.keep) fs.rmSync(dir, { recursive: true, force: true });
else console.log(`kept ${dir}`);
