// Service benchmark.
// 1. Due status for the /service page: 500 compressors × 10 tasks in 5 time zones, each task with a log entry, hour
//    meters and a month of hourly rollups for the run-hours forecast. Times the pure computation and the whole read
//    (SQLite + computation) as the page does it (target < 100 ms).
// 2. A 20 MB photo uploaded and downloaded through the app's storage code (lib/storage) in its own web process
//    against the local S3 fake: MB/s both ways and the web process's peak memory during the upload (it must stream).
// Run: npm run bench:service
import { spawn } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { computeDueList, loadDueInputs, serviceDueList } from "@/db/service";
import { startS3Fake } from "@/lib/storage/s3-fake";

const DAY = 86_400_000;
const SITES = ["Europe/London", "Europe/Oslo", "Europe/Malta", "America/New_York", "Australia/Sydney"];
const COMPRESSORS = 500;
const TASKS = 10;

function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-service-bench-"));
const file = path.join(dir, "airkeep.db");
const db = openDatabase(file);
runMigrations(db);
const sql = db.$client;
const now = Date.UTC(2026, 10, 20, 12, 0, 0);
const rand = rng(12);

sql.transaction(() => {
  sql.prepare("INSERT INTO compressor_models (id, name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES (1, 'Bench', 4, 320, 350, 0)").run();
  for (let t = 0; t < TASKS; t++) {
    const hours = t % 3 === 2 ? null : [250, 500, 1000, 2000][t % 4]!;
    const months = t % 3 === 1 ? null : [1, 6, 12, 24][t % 4]!;
    sql.prepare("INSERT INTO service_tasks (scope_type, scope_id, code, name, every_hours, every_months, updated_at) VALUES ('model', 1, ?, ?, ?, ?, 0)").run(`task-${t}`, `Task ${t}`, hours, months);
  }
  SITES.forEach((zone, i) => sql.prepare("INSERT INTO sites (id, name, code, time_zone, created_at) VALUES (?, ?, ?, ?, 0)").run(i + 1, `Site ${i}`, `site-${i}`, zone));
  const logStmt = sql.prepare("INSERT INTO service_log (compressor_id, site_id, done_at, hour_meter_h, tasks, submission_id, created_at) VALUES (?, ?, ?, ?, ?, ?, 0)");
  const rollup = sql.prepare("INSERT INTO readings_1h (compressor_id, bucket_ts, n, hour_meter_h) VALUES (?, ?, 1, ?)");
  for (let id = 1; id <= COMPRESSORS; id++) {
    const site = ((id - 1) % SITES.length) + 1;
    sql
      .prepare("INSERT INTO compressors (id, site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at) VALUES (?, ?, 1, ?, ?, ?, 330, 290, 0, 0)")
      .run(id, site, `C-${id}`, `BENCH-${id}`, `bench-${id}`);
    const meter = 1000 + rand() * 8000;
    const perDay = 1 + rand() * 6;
    sql.prepare("INSERT INTO compressor_state (compressor_id, ts, hour_meter_h, updated_at) VALUES (?, ?, ?, ?)").run(id, now, meter, now);
    for (let d = 30; d >= 0; d -= 3) rollup.run(id, now - d * DAY, meter - d * perDay);
    for (let t = 0; t < TASKS; t++) {
      const ago = Math.floor(rand() * 400);
      logStmt.run(id, site, now - ago * DAY, meter - ago * perDay, JSON.stringify([{ code: `task-${t}`, name: `Task ${t}` }]), `bench-${id}-${t}`);
    }
  }
})();

function timeIt(label: string, runs: number, fn: () => unknown): number {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const median = times[Math.floor(times.length / 2)]!;
  console.log(`  ${label.padEnd(58)} best ${times[0]!.toFixed(1)} … median ${median.toFixed(1)} ms, worst ${times[times.length - 1]!.toFixed(1)} ms`);
  return median;
}

console.log(`Due status, ${COMPRESSORS} compressors × ${TASKS} tasks (${COMPRESSORS * TASKS} tasks) in ${SITES.length} time zones`);
const firstT0 = performance.now();
const firstList = serviceDueList(db, now, null);
console.log(`  first call (cold caches)                                   ${(performance.now() - firstT0).toFixed(1)} ms, ${firstList.length} tasks, ${firstList.filter((d) => d.status === "overdue").length} overdue`);
const inputs = loadDueInputs(db, now, null);
const compute = timeIt("computation only (shared/service-due.ts), 20 runs", 20, () => computeDueList(inputs, now));
const whole = timeIt("whole /service read: SQLite + computation + sort, 20 runs", 20, () => serviceDueList(db, now, null));
console.log(`  target < 100 ms: ${whole < 100 ? "met" : "NOT met"} (computation ${compute.toFixed(1)} ms, with reads ${whole.toFixed(1)} ms)`);

// ---- upload and download
const SIZE = 20 * 1024 * 1024 - 64 * 1024;
const photo = path.join(dir, "photo.jpg");
{
  const head = Buffer.from("ffd8ffe000104a46494600010100000100010000", "hex");
  const fd = fs.openSync(photo, "w");
  fs.writeSync(fd, head);
  let left = SIZE - head.length;
  while (left > 0) {
    const n = Math.min(left, 1 << 20);
    fs.writeSync(fd, randomBytes(n));
    left -= n;
  }
  fs.closeSync(fd);
}
const photoSha = createHash("sha256").update(fs.readFileSync(photo)).digest("hex");
sql.prepare("INSERT INTO service_log (id, compressor_id, site_id, done_at, tasks, submission_id, created_at) VALUES (999999, 1, 1, ?, '[]', 'bench-upload', 0)").run(now);

const fake = await startS3Fake({ port: 0, directory: path.join(dir, "files"), bucket: "airkeep-bench" });
const web = spawn(process.execPath, ["--import", "tsx", "lib/bench/service-web.ts"], {
  env: { ...process.env, BENCH_DB: file, BENCH_S3: fake.url, NODE_NO_WARNINGS: "1" },
  stdio: ["ignore", "pipe", "inherit"],
});
const port = await new Promise<number>((resolve, reject) => {
  let out = "";
  web.stdout!.on("data", (c: Buffer) => {
    out += c.toString();
    const m = /PORT (\d+)/.exec(out);
    if (m) resolve(Number(m[1]));
  });
  web.on("exit", (code) => reject(new Error(`web process exited with ${code}`)));
});

function rssKb(pid: number): number {
  const m = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  return m ? Number(m[1]) : 0;
}

async function upload(): Promise<{ ms: number; peakMb: number; baseMb: number; id: number }> {
  const boundary = `----airkeepbench${randomBytes(8).toString("hex")}`;
  const pre = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="photo.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`);
  const post = Buffer.from(`\r\n--${boundary}--\r\n`);
  const body = Readable.toWeb(
    Readable.from(
      (async function* () {
        yield pre;
        yield* fs.createReadStream(photo, { highWaterMark: 256 * 1024 });
        yield post;
      })(),
    ),
  ) as unknown as ReadableStream<Uint8Array>;
  const baseMb = rssKb(web.pid!) / 1024;
  let peak = baseMb;
  const sampler = setInterval(() => (peak = Math.max(peak, rssKb(web.pid!) / 1024)), 10);
  const t0 = performance.now();
  const res = await fetch(`http://127.0.0.1:${port}/upload?ownerId=999999`, {
    method: "POST",
    body,
    headers: { "content-type": `multipart/form-data; boundary=${boundary}`, "content-length": String(pre.length + SIZE + post.length) },
    duplex: "half",
  } as RequestInit);
  const json = (await res.json()) as { attachment?: { id: number; sha256: string } };
  const ms = performance.now() - t0;
  clearInterval(sampler);
  peak = Math.max(peak, rssKb(web.pid!) / 1024);
  if (!json.attachment || json.attachment.sha256 !== photoSha) throw new Error(`upload failed: ${res.status} ${JSON.stringify(json)}`);
  return { ms, peakMb: peak, baseMb, id: json.attachment.id };
}

console.log(`\nUpload and download of a ${(SIZE / 1024 / 1024).toFixed(1)} MB photo through the storage code in its own web process, S3 fake (s3rver) on loopback`);
// A first small round to load the modules, so the peak below is the upload's own.
const warm = await upload().catch((e: Error) => {
  console.error(e.message);
  process.exit(1);
});
sql.prepare("DELETE FROM attachments").run();
const up = await upload();
const mb = SIZE / 1024 / 1024;
console.log(`  upload    ${(mb / (up.ms / 1000)).toFixed(1)} MB/s (${up.ms.toFixed(0)} ms; warm-up round ${warm.ms.toFixed(0)} ms)`);
console.log(`  web process memory during the upload: ${up.baseMb.toFixed(0)} MB before, peak ${up.peakMb.toFixed(0)} MB (+${(up.peakMb - up.baseMb).toFixed(0)} MB for a ${mb.toFixed(0)} MB file)`);

const t0 = performance.now();
const res = await fetch(`http://127.0.0.1:${port}/download/${up.id}`);
const hash = createHash("sha256");
let got = 0;
for await (const chunk of res.body as unknown as AsyncIterable<Uint8Array>) {
  hash.update(chunk);
  got += chunk.length;
}
const dms = performance.now() - t0;
if (hash.digest("hex") !== photoSha || got !== SIZE) throw new Error("download differs from the upload");
console.log(`  download  ${(mb / (dms / 1000)).toFixed(1)} MB/s (${dms.toFixed(0)} ms), bytes identical (SHA-256)`);

web.kill("SIGTERM");
await fake.close();
db.$client.close();
fs.rmSync(dir, { recursive: true, force: true });
console.log("\nMeasured on a shared 2-core machine: figures are noisy when other work runs.");
process.exit(0);
