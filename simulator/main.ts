import { parseArgs } from "node:util";
import { openDatabase } from "../db/client";
import { clearHistoryBackfill, markHistoryBackfill } from "../db/history-backfill";
import { backfill } from "./backfill";
import { backfillProgress } from "./backfill-progress";
import { defaultDevicesPath, defaultStatePath, readDevicesFile } from "./devices";
import { faultKinds, parseFaultSpec } from "./model/faults";
import { FleetPublisher } from "./publisher";
import { demoOpening } from "./demo-opening";
import { readCounters, writeCounters, type SavedCounters } from "./state-file";

const HELP = `Airkeep simulator: publishes a fleet of simulated breathing-air compressors over MQTT, or writes their history.

Usage: tsx simulator/main.ts [options]

  --devices <file>        device list (default: demo-devices.json beside DATABASE_URL)
  --interval <s>          seconds between telemetry messages (default 5)
  --speed <n>             model time runs n times faster than real time; timestamps stay real time (default 1)
  --seed <text>           seed for everything random (default airkeep)
  --qos1                  telemetry at QoS 1 (default QoS 0; events are always QoS 1)
  --fault <spec>          schedule a fault, repeatable: <device>:<kind>[/<stage>]@<model minutes>[+<minutes>]
                          kinds: ${faultKinds.join(", ")}; minutes count from the start
                          (of the span, in a backfill); a heat or oil fault shows once the machine runs
  --incidents <n>         demo incidents per model day across the fleet (default 2 live, 0.3 in a backfill; 0 = none)
  --only <ids>            comma-separated device ids to simulate
  --fresh                 ignore saved hour meters and start counters
  --run-for <s>           stop after this many real seconds
  --backfill <span>       write history instead of publishing, e.g. 90d, 36h (raw readings within RETENTION_DAYS)
  --retention-days <n>    raw-reading retention for the backfill (default RETENTION_DAYS or 30)
  --opening               play the demo's scripted first ten minutes (a fill and a cooling incident)
  --quiet                 log only errors and trips

Environment: MQTT_URL (default mqtt://127.0.0.1:1883), DATABASE_URL, RETENTION_DAYS.`;

const { values: flags } = parseArgs({
  options: {
    devices: { type: "string" },
    interval: { type: "string", default: "5" },
    speed: { type: "string", default: "1" },
    seed: { type: "string", default: "airkeep" },
    qos1: { type: "boolean", default: false },
    fault: { type: "string", multiple: true, default: [] },
    incidents: { type: "string" },
    only: { type: "string" },
    fresh: { type: "boolean", default: false },
    "run-for": { type: "string" },
    backfill: { type: "string" },
    "retention-days": { type: "string" },
    quiet: { type: "boolean", default: false },
    opening: { type: "boolean", default: false },
    help: { type: "boolean", short: "h", default: false },
  },
  strict: true,
});

if (flags.help) {
  console.log(HELP);
  process.exit(0);
}

function positive(name: string, raw: string | undefined, fallback: number, allowZero = false): number {
  if (raw === undefined) return fallback;
  const v = Number(raw);
  if (!Number.isFinite(v) || v < 0 || (!allowZero && v === 0)) fail(`--${name} must be a ${allowZero ? "non-negative" : "positive"} number`);
  return v;
}

function span(raw: string): number {
  const m = /^(\d+(?:\.\d+)?)([dhm])$/.exec(raw);
  if (!m) fail(`--backfill takes a span such as 90d, 36h or 30m (got "${raw}")`);
  return Number(m[1]) * { d: 86_400_000, h: 3_600_000, m: 60_000 }[m[2] as "d" | "h" | "m"];
}

function fail(message: string): never {
  console.error(`[simulator] ${message}`);
  process.exit(2);
}

const log = (line: string) => console.log(`[simulator] ${line}`);
const devicesPath = flags.devices ?? defaultDevicesPath();
const statePath = defaultStatePath(devicesPath);
let devices;
try {
  devices = readDevicesFile(devicesPath).devices;
} catch (err) {
  fail((err as Error).message);
}
if (flags.only) {
  const wanted = new Set(flags.only.split(",").map((s) => s.trim()));
  devices = devices.filter((d) => wanted.has(d.deviceId));
  if (devices.length === 0) fail(`--only matched no device in ${devicesPath}`);
}
const known = new Set(devices.map((d) => d.deviceId));
const intervalS = positive("interval", flags.interval, 5);
const seed = flags.seed;

if (flags.backfill !== undefined) {
  const spanMs = span(flags.backfill);
  const now = Date.now();
  const faults = flags.fault.map((f) => parseFaultSpec(f, now - spanMs));
  for (const f of faults) if (!known.has(f.deviceId)) fail(`--fault names unknown device ${f.deviceId}`);
  const retentionDays = positive("retention-days", flags["retention-days"] ?? process.env.RETENTION_DAYS, 30);
  const db = openDatabase();
  // While this stands (and this process lives), the monthly report e-mails wait for the history to be complete.
  markHistoryBackfill(db, process.pid);
  try {
    const res = backfill({
      db,
      devices,
      seed,
      spanMs,
      intervalS,
      retentionDays,
      incidentsPerDay: positive("incidents", flags.incidents, 0.3, true),
      faults,
      now,
      progress: process.stderr.isTTY === true,
      onProgress: backfillProgress(db, log, { lines: process.stderr.isTTY !== true }),
      log,
    });
    let rows = 0;
    let raw = 0;
    let events = 0;
    for (const d of res.devices) {
      rows += d.rows;
      raw += d.rawRows;
      events += d.events;
      log(
        d.skipped
          ? `${d.deviceId}: skipped (${d.skipped})`
          : `${d.deviceId}: ${d.rows} readings (${d.rawRows} kept raw), ${d.inserted} new, ${d.duplicates} already stored, ${d.events} events` +
              (d.segments.length === 0 ? " (history already complete)" : ""),
      );
    }
    writeCounters(statePath, res.counters);
    log(`backfill done in ${(res.elapsedMs / 1000).toFixed(1)} s: ${rows} readings (${raw} raw), ${events} device events`);
  } finally {
    clearHistoryBackfill(db);
    db.$client.close();
  }
} else {
  const speed = positive("speed", flags.speed, 1);
  const now = Date.now();
  const faults = flags.fault.map((f) => parseFaultSpec(f, now));
  for (const f of faults) if (!known.has(f.deviceId)) fail(`--fault names unknown device ${f.deviceId}`);
  const url = process.env.MQTT_URL || "mqtt://127.0.0.1:1883";
  const quiet = flags.quiet;
  const init = flags.fresh ? new Map<string, Partial<SavedCounters>>() : new Map<string, Partial<SavedCounters>>(readCounters(statePath));
  const opening = flags.opening ? demoOpening(devices, now, process.env.NEXTAUTH_URL ?? "http://localhost:3000") : null;
  if (opening) {
    faults.push(...opening.faults);
    for (const [id, c] of opening.init) init.set(id, { ...init.get(id), ...c });
    for (const line of opening.story) log(line);
  } else if (flags.opening) {
    log("--opening needs the demo fleet (devices mb-main and hr-bay); publishing without it");
  }
  const publisher = new FleetPublisher({
    url,
    devices,
    seed,
    intervalS,
    speed,
    telemetryQos: flags.qos1 ? 1 : 0,
    faults,
    incidentsPerDay: positive("incidents", flags.incidents, 2, true),
    init,
    log: (line) => {
      if (!quiet || line.includes("TRIP")) log(line);
    },
    onCounters: (c) => writeCounters(statePath, c),
  });
  publisher.start(now);
  log(`publishing ${devices.length} compressors to ${url} every ${intervalS} s, model speed ×${speed}, seed "${seed}"`);
  for (const f of faults) log(`fault scheduled: ${f.deviceId} ${f.kind} at model +${Math.round((f.atMs - now) / 60_000)} min`);

  let stopping = false;
  const stop = async (why: string) => {
    if (stopping) return;
    stopping = true;
    log(`stopping (${why})`);
    await publisher.stop();
    process.exit(0);
  };
  process.on("SIGINT", () => void stop("SIGINT"));
  process.on("SIGTERM", () => void stop("SIGTERM"));
  if (flags["run-for"] !== undefined) {
    const s = positive("run-for", flags["run-for"], 0);
    setTimeout(() => void stop(`ran for ${s} s`), s * 1000);
  }
}
