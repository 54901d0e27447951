// Event-log benchmark: fills a temporary database with a year of events (1,000,000 by default), then times
// full-text searches with filters and filtered pages through db/event-search.ts, and prints p50/p95/max.
// Run: npx tsx lib/bench/events.ts [--events 1000000] [--keep /path/to/file.db] [--reuse /path/to/file.db]
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { openDatabase, type Db } from "@/db/client";
import {
  eventQueryPlan,
  iterateEvents,
  searchEvents,
  type EventFilter,
  type EventScope,
} from "@/db/event-search";
import { runMigrations } from "@/db/migrate";
import { signalInfo, type AlarmSignal, type Priority } from "@/shared/alarm-rules";
import { tripCodes } from "@/shared/trip-codes";
import seedrandom from "seedrandom";

// ---------- a deterministic random source ----------

function rng(seed: number) {
  const next = seedrandom.alea(String(seed));
  return {
    next,
    int: (lo: number, hi: number) => lo + Math.floor(next() * (hi - lo + 1)),
    pick: <T>(xs: readonly T[]): T => xs[Math.floor(next() * xs.length)]!,
  };
}

// ---------- an invented fleet ----------

const benchSites = [
  { code: "gull-point", name: "Gull Point Fire Station", timeZone: "Europe/London" },
  { code: "ostre-hamn", name: "Østre Hamn Brannstasjon", timeZone: "Europe/Oslo" },
  { code: "lanternfish", name: "Lanternfish Dive Centre", timeZone: "Europe/Malta" },
  { code: "cape-ember", name: "Cape Ember Rescue", timeZone: "America/Halifax" },
  { code: "kelp-deep", name: "Kelp Deep Divers", timeZone: "Australia/Hobart" },
  { code: "saltmarsh-quay", name: "Saltmarsh Quay Fire & Rescue", timeZone: "Pacific/Auckland" },
  { code: "high-mesa", name: "High Mesa Station 4", timeZone: "America/Denver" },
  { code: "lantern-key", name: "Lantern Key Marine Rescue", timeZone: "Asia/Singapore" },
] as const;

const unitNames = ["Main", "Portable", "Bay unit", "Workshop", "Boat unit"] as const;
const people = [
  ["Ines Varga", "ines.varga@example.org"],
  ["Tobias Renner", "tobias.renner@example.org"],
  ["Priya Holm", "priya.holm@example.org"],
  ["Mateo Quist", "mateo.quist@example.org"],
  ["Hana Oduya", "hana.oduya@example.org"],
  ["Lars Brennan", "lars.brennan@example.org"],
  ["Ruth Achebe", "ruth.achebe@example.org"],
  ["Noel Sørby", "noel.sorby@example.org"],
  ["Kiri Tane", "kiri.tane@example.org"],
  ["Omar Feld", "omar.feld@example.org"],
  ["Greta Moss", "greta.moss@example.org"],
  ["Devi Arland", "devi.arland@example.org"],
] as const;
const ackComments = [
  "Checked on site, cooling fan running again",
  "Topped up oil, level was at minimum",
  "Filling station busy, expected during cylinder fills",
  "Purifier cartridge changed",
  "Sensor cable reseated, reading steady",
  "Intake moved away from the generator exhaust",
  "Drain valve cleared, condensate drained",
  "Watching it, will call the technician if it repeats",
  "Ambient hot in the plant room, door opened",
  "Known fault, valve service booked",
];
const states = ["running", "standby", "stopped", "starting"] as const;
const alarmSignals = Object.keys(signalInfo) as AlarmSignal[];
const priorities: Priority[] = ["critical", "warning", "advisory"];

export type BenchFleet = { siteIds: number[]; compressorIds: number[]; compressorSite: Map<number, number> };

function createFleet(db: Db, now: number): BenchFleet {
  const c = db.$client;
  const model = c
    .prepare(
      "INSERT INTO compressor_models (name, maker, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Bench 300', 'Bench', 4, 300, 330, ?)",
    )
    .run(now).lastInsertRowid as number;
  const addSite = c.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, ?, ?)");
  const addCompressor = c.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, 300, 265, ?, ?)`,
  );
  const fleet: BenchFleet = { siteIds: [], compressorIds: [], compressorSite: new Map() };
  benchSites.forEach((s, i) => {
    const siteId = addSite.run(s.name, s.code, s.timeZone, now).lastInsertRowid as number;
    fleet.siteIds.push(siteId);
    unitNames.forEach((u, j) => {
      const name = `${s.code.slice(0, 2).toUpperCase()}-${j + 1} ${u}`;
      const id = addCompressor.run(siteId, model, name, `BEN-${i}-${j}-0001`, `${s.code}-${j}`, now, now).lastInsertRowid as number;
      fleet.compressorIds.push(id);
      fleet.compressorSite.set(id, siteId);
    });
  });
  return fleet;
}

type Row = [ts: number, kind: string, action: string, priority: string | null, siteId: number | null, compressorId: number | null, actor: string, text: string];

/** Fills `n` events over the year before `now`, a few arriving late (device time behind insertion order). */
export function fillEvents(db: Db, n: number, now = Date.now(), seed = 42): BenchFleet {
  const r = rng(seed);
  const fleet = createFleet(db, now);
  const names = new Map<number, string>(
    (db.$client.prepare("SELECT id, name FROM compressors").all() as { id: number; name: string }[]).map((x) => [x.id, x.name]),
  );
  const insert = db.$client.prepare(
    "INSERT INTO events (ts, kind, action, priority, site_id, compressor_id, actor, text) VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
  );
  const start = now - 365 * 86_400_000;
  const step = (now - start) / n;

  function event(ts: number): Row {
    const compressorId = r.pick(fleet.compressorIds);
    const siteId = fleet.compressorSite.get(compressorId)!;
    const unit = names.get(compressorId)!;
    const [person, email] = r.pick(people);
    const roll = r.next();
    if (roll < 0.42) {
      const from = r.pick(states);
      const to = r.pick(states.filter((s) => s !== from));
      return [ts, "state", "state.change", null, siteId, compressorId, "", `${unit}: ${from} → ${to}`];
    }
    if (roll < 0.66) {
      const signal = r.pick(alarmSignals);
      const info = signalInfo[signal];
      const priority = r.pick(priorities);
      const high = signal !== "oilBar" || r.next() < 0.2;
      const unitText = info.kind === "pressure" ? "bar" : "°C";
      const limit = info.kind === "pressure" ? r.int(3, 330) : r.int(40, 190);
      const clear = r.next() < 0.5;
      return [
        ts,
        "alarm",
        clear ? "alarm.clear" : "alarm.raise",
        priority,
        siteId,
        compressorId,
        "",
        `${unit}: ${info.label} ${high ? "high" : "low"} ${clear ? "cleared" : "raised"} (${priority}), ${(limit + (high ? 1 : -1) * r.int(0, 12)).toFixed(1)} ${unitText}, limit ${limit} ${unitText}`,
      ];
    }
    if (roll < 0.74) {
      const signal = r.pick(alarmSignals);
      return [
        ts,
        "acknowledge",
        "alarm.acknowledge",
        r.pick(priorities),
        siteId,
        compressorId,
        email,
        `${person} acknowledged “${signalInfo[signal].label}” on ${unit}: ${r.pick(ackComments)}`,
      ];
    }
    if (roll < 0.76) {
      const minutes = r.pick([30, 60, 120, 240, 480]);
      return [ts, "shelve", "alarm.shelve", r.pick(priorities), siteId, compressorId, email, `${person} shelved alarms on ${unit} for ${minutes} min: ${r.pick(ackComments)}`];
    }
    if (roll < 0.82) {
      const lost = r.next() < 0.5;
      return [ts, "comms", lost ? "comms.lost" : "comms.restored", lost ? "warning" : null, siteId, compressorId, "", `${unit}: communication ${lost ? "lost" : "restored"}`];
    }
    if (roll < 0.83) {
      const trip = r.pick(tripCodes);
      return [ts, "trip", "trip.reported", "critical", siteId, compressorId, "", `${unit} tripped: trip ${trip.code} ${trip.label}. ${trip.description}`];
    }
    if (roll < 0.88) {
      const failed = r.next() < 0.1;
      return [ts, "auth", failed ? "auth.sign_in_failed" : "auth.sign_in", null, null, null, email, failed ? `Failed sign-in for ${email} (password)` : `${email} signed in`];
    }
    if (roll < 0.91) {
      const what = r.pick(["Oil change", "Intake filter replaced", "Valve service", "Safety-valve check", "Purifier cartridge replaced"]);
      return [ts, "service", "service.log", null, siteId, compressorId, email, `${person} logged service on ${unit}: ${what} at ${r.int(100, 9000)} h`];
    }
    if (roll < 0.92) {
      const signal = r.pick(alarmSignals);
      return [ts, "threshold", "threshold.update", null, siteId, compressorId, email, `${person} changed ${signalInfo[signal].label} limit on ${unit}`];
    }
    if (roll < 0.93) {
      const pass = r.next() < 0.95;
      return [ts, "air-test", "airtest.record", pass ? null : "warning", siteId, compressorId, email, `Air test for ${unit} ${pass ? "passed" : "failed: water content above limit"}`];
    }
    if (roll < 0.97) {
      return [ts, "mail", "mail.sent", null, siteId, compressorId, "", `Alarm e-mail sent to ${email} about ${unit}`];
    }
    return [ts, "config", "compressor.update", null, siteId, compressorId, email, `${email}: compressor update ${unit}`];
  }

  const BATCH = 10_000;
  const tx = db.$client.transaction((rows: Row[]) => {
    for (const row of rows) insert.run(...row);
  });
  for (let i = 0; i < n; i += BATCH) {
    const rows: Row[] = [];
    for (let j = i; j < Math.min(n, i + BATCH); j++) {
      let ts = Math.round(start + j * step + r.next() * step);
      // A device's buffered messages arrive late: their time is behind the insertion order.
      if (r.next() < 0.05) ts -= r.int(1_000, 15 * 60_000);
      // Round some to whole seconds so that equal times occur, as they do with second-resolution devices.
      if (r.next() < 0.3) ts = Math.floor(ts / 1000) * 1000;
      rows.push(event(ts));
    }
    tx(rows);
  }
  return fleet;
}

// ---------- timing ----------

function percentile(sorted: number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;
}

type Timing = { label: string; p50: number; p95: number; max: number; cpuP95: number };

/** Wall-clock and CPU time per call (CPU time shows the cost when other processes share the cores). */
function time(label: string, runs: number, fn: (i: number) => unknown): Timing {
  for (let i = 0; i < 3; i++) fn(i); // warm the page cache and the statement cache
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    fn(i);
    wall.push(Number(process.hrtime.bigint() - t0) / 1e6);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  wall.sort((a, b) => a - b);
  cpu.sort((a, b) => a - b);
  return { label, p50: percentile(wall, 50), p95: percentile(wall, 95), max: wall[wall.length - 1]!, cpuP95: percentile(cpu, 95) };
}

async function main() {
  const { values } = parseArgs({
    options: {
      events: { type: "string", default: "1000000" },
      keep: { type: "string" },
      reuse: { type: "string" },
      runs: { type: "string", default: "60" },
    },
  });
  const n = Number(values.events);
  const runs = Number(values.runs);
  const dir = values.reuse || values.keep ? null : fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-bench-events-"));
  const file = values.reuse ?? values.keep ?? path.join(dir!, "events.db");
  const reuse = Boolean(values.reuse && fs.existsSync(values.reuse));
  const db = openDatabase(file);
  const now = Date.now();
  let fleet: BenchFleet;
  if (reuse) {
    const siteIds = (db.$client.prepare("SELECT id FROM sites ORDER BY id").all() as { id: number }[]).map((x) => x.id);
    const cs = db.$client.prepare("SELECT id, site_id AS siteId FROM compressors ORDER BY id").all() as { id: number; siteId: number }[];
    fleet = { siteIds, compressorIds: cs.map((c) => c.id), compressorSite: new Map(cs.map((c) => [c.id, c.siteId])) };
    console.log(`Reusing ${file}`);
  } else {
    runMigrations(db);
    const t0 = performance.now();
    fleet = fillEvents(db, n, now);
    db.$client.pragma("wal_checkpoint(TRUNCATE)");
    console.log(`Filled ${n.toLocaleString("en")} events in ${((performance.now() - t0) / 1000).toFixed(1)} s → ${file}`);
  }
  const total = (db.$client.prepare("SELECT count(*) AS n FROM events").get() as { n: number }).n;
  const size = fs.statSync(file).size;
  console.log(`${total.toLocaleString("en")} events, database ${(size / 1e6).toFixed(0)} MB`);

  const r = rng(7);
  const everyone: EventScope = { siteIds: null, includeSiteless: true };
  const twoSites: EventScope = { siteIds: fleet.siteIds.slice(0, 2), includeSiteless: false };
  const yearStart = now - 365 * 86_400_000;
  const month = () => {
    const from = yearStart + r.int(0, 330) * 86_400_000;
    return { from, to: from + 30 * 86_400_000 };
  };
  // What people type: a word, a half-typed word (prefix), an e-mail, a unit name, a trip code, a phrase.
  const words = ["temperature", "temp", "oil", "purifier cartridge", "trip 110", "fan", "valve", "ines.varga@example.org", "communication lost", "TA-3", "condensate", "delivery pressure high", "over-temp", "sensor cable"];

  const cases: { label: string; scope: EventScope; filter: () => EventFilter }[] = [
    { label: "search, no filter", scope: everyone, filter: () => ({ q: r.pick(words) }) },
    { label: "search + site", scope: everyone, filter: () => ({ q: r.pick(words), siteId: r.pick(fleet.siteIds) }) },
    { label: "search + compressor + month", scope: everyone, filter: () => ({ q: r.pick(words), compressorId: r.pick(fleet.compressorIds), ...month() }) },
    { label: "search + priority + kind (2-site scope)", scope: twoSites, filter: () => ({ q: r.pick(words), priority: r.pick(priorities), kind: "alarm" }) },
    { label: "search + month (2-site scope)", scope: twoSites, filter: () => ({ q: r.pick(words), ...month() }) },
    { label: "search prefix 'temp'", scope: everyone, filter: () => ({ q: "temp" }) },
    { label: "page, no filter", scope: everyone, filter: () => ({}) },
    { label: "page, site + kind", scope: everyone, filter: () => ({ siteId: r.pick(fleet.siteIds), kind: r.pick(["alarm", "state", "acknowledge", "trip"]) }) },
    { label: "page, compressor + month", scope: everyone, filter: () => ({ compressorId: r.pick(fleet.compressorIds), ...month() }) },
    { label: "page, priority critical (2-site scope)", scope: twoSites, filter: () => ({ priority: "critical" }) },
    { label: "page, kind trip + month (2-site scope)", scope: twoSites, filter: () => ({ kind: "trip", ...month() }) },
  ];

  const results: Timing[] = [];
  for (const c of cases) {
    // First page, then a deep page reached by keyset (the cursor of the 20th page of 50).
    results.push(time(`${c.label} — first page`, runs, () => searchEvents(db, c.scope, c.filter(), { limit: 50 })));
    const deep = (() => {
      const f = c.filter();
      let cursor = searchEvents(db, c.scope, f, { limit: 50 }).next;
      for (let i = 0; i < 19 && cursor; i++) cursor = searchEvents(db, c.scope, f, { limit: 50, after: cursor }).next;
      return { f, cursor };
    })();
    if (deep.cursor) {
      results.push(time(`${c.label} — page 21`, runs, () => searchEvents(db, c.scope, deep.f, { limit: 50, after: deep.cursor! })));
    }
  }

  let exported = 0;
  const t0 = performance.now();
  for (const _row of iterateEvents(db, twoSites, { from: yearStart, to: yearStart + 90 * 86_400_000 })) exported++;
  const exportMs = performance.now() - t0;

  console.log("\nQuery plans:");
  for (const c of [cases[0]!, cases[3]!, cases[7]!, cases[9]!]) {
    console.log(`  ${c.label}:\n    ${eventQueryPlan(db, c.scope, c.filter()).join("\n    ")}`);
  }
  const load = os.loadavg()[0]!.toFixed(1);
  console.log(`\n${runs} runs per case, load average ${load} on ${os.cpus().length} cores. Times in ms.`);
  console.log(`${"case".padEnd(62)} ${"p50".padStart(8)} ${"p95".padStart(8)} ${"max".padStart(8)} ${"cpu p95".padStart(8)}`);
  for (const x of results) {
    console.log(
      `${x.label.padEnd(62)} ${x.p50.toFixed(2).padStart(8)} ${x.p95.toFixed(2).padStart(8)} ${x.max.toFixed(2).padStart(8)} ${x.cpuP95.toFixed(2).padStart(8)}`,
    );
  }
  const worstOf = (pick: (t: Timing) => boolean) => Math.max(...results.filter(pick).map((x) => x.p95));
  const search = worstOf((x) => x.label.startsWith("search"));
  const page = worstOf((x) => x.label.startsWith("page"));
  console.log(`\nWorst p95 — search with filters: ${search.toFixed(2)} ms, filtered page: ${page.toFixed(2)} ms (target ≤ 50 ms each).`);
  console.log(`Export iteration: ${exported.toLocaleString("en")} rows in ${exportMs.toFixed(0)} ms`);

  db.$client.close();
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
}

if (process.argv[1] && path.resolve(process.argv[1]) === path.resolve(new URL(import.meta.url).pathname)) {
  await main();
}
