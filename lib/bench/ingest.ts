// Ingest benchmark: broker, publisher, ingester (or a bare counting subscriber) each in its own process, run from a
// bundle of this file on plain Node with the flags the demo gives them (roles are the file started with an argument).
// The same publisher feeds the bare subscriber and the ingester. Run: npm run bench:ingest [BENCH_SECONDS=10]
import { type ChildProcess, fork } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import { monitorEventLoopDelay } from "node:perf_hooks";
import path from "node:path";
import { fileURLToPath } from "node:url";
import net from "node:net";
import bcrypt from "bcryptjs";
import mqtt from "mqtt";
import mqttPacket from "mqtt-packet";
import WebSocket from "ws";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { startBroker } from "@/lib/broker/broker";
import { INGEST_TOPIC, INGEST_USERNAME } from "@/lib/broker/ingest-credential";
import { bundleNodeProgram, programFlags } from "@/lib/cli/node-bundle";
import { startIngester } from "@/lib/ingester/ingester";
import { createLiveToken } from "@/lib/live-token";
import type { LiveMessage } from "@/shared/live";
import { topicFor } from "@/shared/telemetry";

const SELF = fileURLToPath(import.meta.url);
/** The roles run from a bundle on plain Node, as the demo runs its server programs (lib/cli/services.ts). */
let roleBundle = SELF;
const ORIGIN = "http://bench.local";
const INGEST_PASSWORD = "bench-ingest-password-0123456789";
const LIVE_SECRET = "bench-live-secret-0123456789abcdef";

type Device = { deviceId: string; siteCode: string; secret: string };
type Msg = { id?: number; cmd?: string; type?: string; [k: string]: unknown };

// ---------- small helpers ----------

function pct(sorted: Float64Array | number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))]!;
}

function summarize(samples: number[]): { n: number; p50: number; p99: number; max: number } {
  const a = Float64Array.from(samples).sort();
  return { n: a.length, p50: pct(a, 50), p99: pct(a, 99), max: a.length ? a[a.length - 1]! : Number.NaN };
}

function serve(handlers: Record<string, (m: Msg) => Promise<unknown> | unknown>): void {
  process.on("message", async (m: Msg) => {
    const h = handlers[m.cmd ?? ""];
    if (!h) return;
    const result = await h(m);
    process.send?.({ id: m.id, ...(result as object) });
  });
}

const children = new Set<ChildProcess>();
// Children die with the orchestrator, however it ends.
process.on("exit", () => {
  for (const c of children) if (c.exitCode === null && c.pid) process.kill(c.pid, "SIGKILL");
});
for (const sig of ["SIGINT", "SIGTERM"] as const) process.on(sig, () => process.exit(1));

class Child {
  private seq = 0;
  private waiting = new Map<number, (m: Msg) => void>();
  readonly proc: ChildProcess;
  constructor(role: string, env: Record<string, string>) {
    const flags = [...programFlags(role), ...(process.env.BENCH_PROFILE === role ? ["--cpu-prof", "--cpu-prof-dir=/tmp/bench-prof"] : [])];
    if (role === "ingester") flags.push("--expose-gc");
    this.proc = fork(roleBundle, [role], { execArgv: flags, env: { ...process.env, ...env }, stdio: "inherit" });
    children.add(this.proc);
    this.proc.once("exit", () => children.delete(this.proc));
    this.proc.on("message", (m: Msg) => {
      if (m.id !== undefined) {
        this.waiting.get(m.id)?.(m);
        this.waiting.delete(m.id);
      }
    });
  }
  call<T = Msg>(cmd: string, args: Record<string, unknown> = {}): Promise<T> {
    const id = ++this.seq;
    return new Promise((resolve) => {
      this.waiting.set(id, resolve as (m: Msg) => void);
      this.proc.send({ id, cmd, ...args });
    });
  }
  async stop(): Promise<void> {
    if (this.proc.exitCode !== null) return;
    const exited = new Promise((r) => this.proc.once("exit", r));
    await this.call("stop").catch(() => {});
    await Promise.race([exited, new Promise((r) => setTimeout(r, 5_000))]);
    if (this.proc.exitCode === null) process.kill(this.proc.pid!, "SIGKILL");
  }
}

function loopMonitor() {
  const h = monitorEventLoopDelay({ resolution: 5 });
  h.enable();
  return {
    reset: () => h.reset(),
    read: () => ({ p50: h.percentile(50) / 1e6, p99: h.percentile(99) / 1e6, max: h.max / 1e6 }),
  };
}

function cpuSince(start: NodeJS.CpuUsage, wallStart: number) {
  const u = process.cpuUsage(start);
  return { cpuMs: (u.user + u.system) / 1000, wallMs: Date.now() - wallStart };
}

// ---------- roles ----------

async function brokerRole() {
  const db = openDatabase(process.env.DATABASE_URL!);
  const broker = await startBroker({
    db,
    port: Number(process.env.MQTT_PORT),
    ingestPassword: INGEST_PASSWORD,
    // The bare-subscriber phase runs first; no ingester session may collect its messages meanwhile.
    reserveIngestSession: false,
    log: () => {},
  });
  let cpu0 = process.cpuUsage();
  let wall0 = Date.now();
  const loop = loopMonitor();
  serve({
    reset: () => {
      cpu0 = process.cpuUsage();
      wall0 = Date.now();
      loop.reset();
      return {};
    },
    report: () => ({
      ...cpuSince(cpu0, wall0),
      rssMb: process.memoryUsage.rss() / 1048576,
      stats: broker.stats(),
      eventLoopDelayMs: loop.read(),
    }),
    stop: async () => {
      await broker.close();
      setImmediate(() => process.exit(0));
      return {};
    },
  });
  process.send?.({ type: "ready" });
}

async function bareRole() {
  let count = 0;
  let first = 0;
  let last = 0;
  const client = await mqtt.connectAsync(process.env.MQTT_URL!, {
    clientId: `airkeep-bench-bare-${process.env.BARE_CLEAN}`,
    username: INGEST_USERNAME,
    password: INGEST_PASSWORD,
    protocolVersion: 4,
    clean: process.env.BARE_CLEAN === "1",
    reconnectPeriod: 0,
  });
  client.on("message", () => {
    last = Date.now();
    if (count++ === 0) first = last;
  });
  await client.subscribeAsync(INGEST_TOPIC, { qos: 1 });
  const cpu0 = process.cpuUsage();
  serve({
    report: () => ({ count, first, last, cpuMs: cpuSince(cpu0, 0).cpuMs }),
    stop: async () => {
      // Leave no persistent session behind to collect the later phases' messages.
      await client.unsubscribeAsync(INGEST_TOPIC);
      await client.endAsync();
      setImmediate(() => process.exit(0));
      return {};
    },
  });
  process.send?.({ type: "ready" });
}

async function ingesterRole() {
  const db = openDatabase(process.env.DATABASE_URL!);
  let lat: number[] = [];
  let committed = 0;
  let firstCommit = 0;
  let lastCommit = 0;
  const ingester = await startIngester({
    db,
    mqttUrl: process.env.MQTT_URL!,
    password: INGEST_PASSWORD,
    live: { port: Number(process.env.LIVE_PORT), allowedOrigins: [ORIGIN], secret: LIVE_SECRET },
    // As the demo runs it against the embedded broker, which caps nothing in flight (lib/cli/services.ts).
    brokerInflightCap: null,
    onCommit(rows, at) {
      if (committed === 0) firstCommit = at;
      lastCommit = at;
      committed += rows.length;
      for (const r of rows) lat.push(at - r.ts);
    },
    log: () => {},
  });
  let cpu0 = process.cpuUsage();
  let wall0 = Date.now();
  const loop = monitorEventLoopDelay({ resolution: 5 });
  loop.enable();
  serve({
    reset: () => {
      loop.reset();
      lat = [];
      committed = 0;
      firstCommit = 0;
      lastCommit = 0;
      cpu0 = process.cpuUsage();
      wall0 = Date.now();
      return {};
    },
    report: () => ({
      committed,
      firstCommit,
      lastCommit,
      commitLatency: summarize(lat),
      ...cpuSince(cpu0, wall0),
      maxRssMb: process.resourceUsage().maxRSS / 1024,
      memory: Object.fromEntries(Object.entries(process.memoryUsage()).map(([k, v]) => [k, Math.round(v / 1048576)])),
      heapUsedAfterGcMb: (() => {
        (globalThis as { gc?: () => void }).gc?.();
        return Math.round(process.memoryUsage().heapUsed / 1048576);
      })(),
      eventLoopDelayMs: { p50: loop.percentile(50) / 1e6, p99: loop.percentile(99) / 1e6, max: loop.max / 1e6 },
      stats: ingester.stats(),
    }),
    stop: async () => {
      await ingester.close();
      db.$client.close();
      setImmediate(() => process.exit(0));
      return {};
    },
  });
  await new Promise<void>((resolve) => {
    const check = () => (ingester.stats().connected ? resolve() : setTimeout(check, 20));
    check();
  });
  process.send?.({ type: "ready" });
}

/** One reading as a gateway would send it (written out rather than JSON.stringify-ed: the publisher is not what is measured). */
function payload(seq: number, ts: number): string {
  const running = seq % 50 !== 0;
  const delivery = Math.round((200 + (seq % 1000) * 0.1) * 10) / 10;
  return (
    `{"v":1,"seq":${seq},"ts":${ts},"runState":"${running ? "running" : "standby"}","motorOn":${running},"deliveryBar":${delivery},` +
    `"stageBar":[6.1,41.5,152.2,null],"stageC":[121.4,133.8,146.2,98.3],"oilBar":4.6,"purifierC":31.2,"intakeC":21.5,` +
    `"hourMeterH":${1520.25 + seq / 3600},"starts":310,"tripCode":null}`
  );
}

/**
 * A device's MQTT 3.1.1 connection, as lean as the protocol allows: packets built with mqtt-packet (the codec the mqtt
 * client itself uses) and each burst of publishes written to the socket at once. Publishing costs the benchmark's own
 * CPU, which on this machine the broker and the ingester would otherwise have.
 */
class DeviceConnection {
  private nextId = 0;
  private acks = new Map<number, () => void>();
  private parser = mqttPacket.parser({ protocolVersion: 4 });
  private out: Buffer[] = [];
  private flushing = false;
  private constructor(private socket: net.Socket) {
    socket.setNoDelay(true);
    socket.on("data", (b) => this.parser.parse(b));
    this.parser.on("packet", (p) => {
      if (p.cmd !== "puback") return;
      const cb = this.acks.get(p.messageId!);
      this.acks.delete(p.messageId!);
      cb?.();
    });
  }
  static connect(url: string, d: Device): Promise<DeviceConnection> {
    const u = new URL(url);
    return new Promise((resolve, reject) => {
      const socket = net.connect(Number(u.port), u.hostname);
      const conn = new DeviceConnection(socket);
      socket.once("error", reject);
      conn.parser.once("packet", (p) => {
        if (p.cmd === "connack" && (p as { returnCode?: number }).returnCode === 0) resolve(conn);
        else reject(new Error(`${d.deviceId}: connection refused`));
      });
      socket.write(
        mqttPacket.generate({ cmd: "connect", protocolVersion: 4, clientId: d.deviceId, username: d.deviceId, password: Buffer.from(d.secret), clean: true, keepalive: 0 }),
      );
    });
  }
  publish(topic: string, body: string, onAck: () => void): void {
    this.nextId = (this.nextId % 65_535) + 1;
    this.acks.set(this.nextId, onAck);
    this.out.push(mqttPacket.generate({ cmd: "publish", topic, payload: body, qos: 1, messageId: this.nextId, retain: false, dup: false }));
    if (!this.flushing) {
      this.flushing = true;
      process.nextTick(() => {
        this.flushing = false;
        const bufs = this.out;
        this.out = [];
        this.socket.write(bufs.length === 1 ? bufs[0]! : Buffer.concat(bufs));
      });
    }
  }
  end(): Promise<void> {
    return new Promise((resolve) => {
      this.socket.end(mqttPacket.generate({ cmd: "disconnect" }), () => resolve());
    });
  }
}

async function publisherRole() {
  const devices = await new Promise<Device[]>((resolve) => {
    process.once("message", (m: Msg) => resolve(m.devices as Device[]));
    process.send?.({ type: "devices?" });
  });
  const clients: { d: Device; c: DeviceConnection; topic: string; lastTs: number; seq: number; inflight: number }[] = [];
  for (let i = 0; i < devices.length; i += 100) {
    const batch = await Promise.all(devices.slice(i, i + 100).map((d) => DeviceConnection.connect(process.env.MQTT_URL!, d)));
    batch.forEach((c, k) => {
      const d = devices[i + k]!;
      clients.push({ d, c, topic: topicFor(d.siteCode, d.deviceId, "telemetry"), lastTs: 0, seq: 0, inflight: 0 });
    });
  }
  const nextTs = (x: (typeof clients)[number]) => {
    x.lastTs = Math.max(Date.now(), x.lastTs + 1);
    return x.lastTs;
  };

  let cpu0 = process.cpuUsage();
  const loop = loopMonitor();
  serve({
    reset: () => {
      cpu0 = process.cpuUsage();
      loop.reset();
      return {};
    },
    report: () => ({ cpuMs: cpuSince(cpu0, 0).cpuMs, eventLoopDelayMs: loop.read() }),
    // For a fixed time, as fast as the broker acknowledges, each device keeping `window` messages in flight.
    max: (m) =>
      new Promise((resolve) => {
        const window = m.window as number;
        const startedAt = Date.now();
        const stopAt = startedAt + (m.durationMs as number);
        let sent = 0;
        let acked = 0;
        let stopped = false;
        const finish = () => stopped && acked === sent && resolve({ startedAt, finishedAt: Date.now(), sent });
        for (const x of clients) {
          const pump = () => {
            while (x.inflight < window && !stopped) {
              sent++;
              x.inflight++;
              x.c.publish(x.topic, payload(x.seq++, nextTs(x)), () => {
                x.inflight--;
                acked++;
                if (!stopped && Date.now() >= stopAt) stopped = true;
                if (stopped) finish();
                else pump();
              });
            }
          };
          pump();
        }
      }),
    // Each device once per period, phases spread evenly.
    paced: (m) =>
      new Promise((resolve) => {
        const count = m.devices as number;
        const periodMs = m.periodMs as number;
        const durationMs = m.durationMs as number;
        const active = clients.slice(0, count);
        const startedAt = Date.now();
        let sent = 0;
        let acked = 0;
        const timers: NodeJS.Timeout[] = [];
        active.forEach((x, i) => {
          const start = setTimeout(() => {
            const tick = () => {
              sent++;
              x.c.publish(x.topic, payload(x.seq++, nextTs(x)), () => acked++);
            };
            tick();
            timers.push(setInterval(tick, periodMs));
          }, (i * periodMs) / active.length);
          timers.push(start);
        });
        setTimeout(() => {
          for (const tm of timers) clearTimeout(tm);
          const wait = () => (acked >= sent ? resolve({ startedAt, finishedAt: Date.now(), sent }) : setTimeout(wait, 20));
          wait();
        }, durationMs);
      }),
    stop: async () => {
      await Promise.all(clients.map((x) => x.c.end()));
      setImmediate(() => process.exit(0));
      return {};
    },
  });
  process.send?.({ type: "ready" });
}

// ---------- orchestration ----------

async function publisher(env: Record<string, string>, devices: Device[]): Promise<Child> {
  const child = new Child("publisher", env);
  child.proc.on("message", (m: Msg) => m.type === "devices?" && child.proc.send({ devices }));
  return ready(child);
}

async function ready(child: Child): Promise<Child> {
  await new Promise<void>((resolve, reject) => {
    child.proc.on("message", (m: Msg) => m.type === "ready" && resolve());
    child.proc.once("exit", (code) => reject(new Error(`child exited with ${code}`)));
  });
  return child;
}

async function main() {
  const t0 = Date.now();
  console.log(`load average at the start: ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} on ${os.cpus().length} cores`);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-bench-"));
  const dbFile = path.join(dir, "bench.db");
  roleBundle = await bundleNodeProgram(SELF, ".build/bench/ingest.mjs");
  const port = 20_000 + Math.floor(Math.random() * 20_000);
  const livePort = port + 1;
  const url = `mqtt://127.0.0.1:${port}`;
  const SITES = 4;
  const DEVICES = 2_000;
  const THROUGHPUT_DEVICES = 200;
  const MAX_MS = Number(process.env.BENCH_SECONDS ?? 10) * 1000;
  const WINDOW = 50;
  const log = (s: string) => console.log(`[${((Date.now() - t0) / 1000).toFixed(1).padStart(5)} s] ${s}`);

  log(`seeding ${DEVICES} compressors in ${dir}`);
  const db = openDatabase(dbFile);
  runMigrations(db);
  const sqlite = db.$client;
  const now = Date.now();
  for (let s = 0; s < SITES; s++) {
    sqlite.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES (?, ?, 'UTC', ?)").run(`Bench ${s}`, `bench-${s}`, now);
  }
  sqlite
    .prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('B', 4, 300, 420, ?)")
    .run(now);
  // The live socket's token names user 1 and a sign-in session; the hub checks both when the socket opens and at pings.
  sqlite
    .prepare("INSERT INTO users (id, email, name, password_hash, role, created_at, updated_at) VALUES (1, 'bench@airkeep.demo', 'Bench', '-', 'viewer', ?, ?)")
    .run(now, now);
  sqlite.prepare("INSERT INTO user_sessions (id, user_id, created_at, last_seen_at) VALUES ('bench-session', 1, ?, ?)").run(now, now);
  const devices: Device[] = [];
  const ins = sqlite.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, device_secret_hash, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
     VALUES (?, 1, ?, ?, ?, ?, 300, 270, ?, ?)`,
  );
  sqlite.transaction(() => {
    for (let i = 0; i < DEVICES; i++) {
      const d = { deviceId: `bench-${i}`, siteCode: `bench-${i % SITES}`, secret: `s-${i}-${Math.random().toString(36).slice(2)}` };
      ins.run((i % SITES) + 1, `Bench ${i}`, `BN-${i}`, d.deviceId, bcrypt.hashSync(d.secret, 4), now, now);
      devices.push(d);
    }
  })();
  sqlite.close();

  const env = { DATABASE_URL: dbFile, MQTT_PORT: String(port), MQTT_URL: url, LIVE_PORT: String(livePort) };
  const broker = await ready(new Child("broker", env));
  log(`broker up on ${port}`);
  const results: Record<string, unknown> = {};

  // Phase 1: bare ceiling, a subscriber that only counts: with a clean session (no broker-side queue) and with a
  // persistent one like the ingester's.
  let pub = await publisher(env, devices.slice(0, THROUGHPUT_DEVICES));
  type CpuReport = { cpuMs: number; wallMs: number };
  const phaseCpu = async (ms: number, parts: Record<string, Child>) => {
    const out: Record<string, number> = {};
    for (const [k, c] of Object.entries(parts)) out[k] = Number((((await c.call<CpuReport>("report")).cpuMs / ms) * 1000).toFixed(1));
    return out;
  };
  const bareRates: Record<string, number> = {};
  for (const clean of ["1", "0"]) {
    const bare = await ready(new Child("bare", { ...env, BARE_CLEAN: clean }));
    await broker.call("reset");
    await pub.call("reset");
    log(`bare ceiling (${clean === "1" ? "clean" : "persistent"} session): QoS 1 for ${MAX_MS / 1000} s from ${THROUGHPUT_DEVICES} devices`);
    const bp = await pub.call<{ startedAt: number; finishedAt: number; sent: number }>("max", { durationMs: MAX_MS, window: WINDOW });
    let br = await bare.call<{ count: number; first: number; last: number; cpuMs: number }>("report");
    for (let i = 0; i < 400 && br.count < bp.sent; i++) {
      await new Promise((r) => setTimeout(r, 50));
      br = await bare.call("report");
    }
    const rate = br.count / ((br.last - bp.startedAt) / 1000);
    bareRates[clean === "1" ? "clean" : "persistent"] = Math.round(rate);
    const cpu = await phaseCpu(br.count, { broker, publisher: pub });
    log(`  received ${br.count} at ${rate.toFixed(0)}/s; CPU ms per 1,000: ${JSON.stringify({ ...cpu, subscriber: Number(((br.cpuMs / br.count) * 1000).toFixed(1)) })}`);
    await bare.stop();
  }
  const bareRate = bareRates.persistent!;

  // Phase 2: the same publisher through broker + validation + storage.
  const ing = await ready(new Child("ingester", env));
  await ing.call("reset");
  await broker.call("reset");
  await pub.call("reset");
  log(`ingest: QoS 1 for ${MAX_MS / 1000} s`);
  const ip = await pub.call<{ startedAt: number; finishedAt: number; sent: number }>("max", { durationMs: MAX_MS, window: WINDOW });
  type IngReport = {
    committed: number;
    lastCommit: number;
    commitLatency: { n: number; p50: number; p99: number; max: number };
    cpuMs: number;
    wallMs: number;
    maxRssMb: number;
    stats: { rejects: Record<string, number>; stored: number };
  };
  let ir = await ing.call<IngReport>("report");
  for (let i = 0; i < 1_200 && ir.committed < ip.sent; i++) {
    await new Promise((r) => setTimeout(r, 50));
    ir = await ing.call("report");
  }
  const ingestRate = ir.committed / ((ir.lastCommit - ip.startedAt) / 1000);
  log(`  committed ${ir.committed} at ${ingestRate.toFixed(0)}/s; p50 ${ir.commitLatency.p50} ms, p99 ${ir.commitLatency.p99} ms`);
  const ingestCpu = await phaseCpu(ir.committed, { broker, publisher: pub, ingester: ing });
  log(`  CPU ms per 1,000: ${JSON.stringify(ingestCpu)}; flushes ${(ir.stats as unknown as { flushes: number }).flushes}; ingester peak RSS so far ${Math.round(ir.maxRssMb)} MB`);
  results.throughput = {
    bareReadingsPerS: bareRates,
    ingestReadingsPerS: Math.round(ingestRate),
    ratio: Number((ingestRate / bareRate).toFixed(2)),
    ratioToCleanSession: Number((ingestRate / bareRates.clean!).toFixed(2)),
    cpuMsPer1000: ingestCpu,
    commitLatencyMs: ir.commitLatency,
    rejects: ir.stats.rejects,
  };
  await pub.stop();

  // Phase 3: paced 2,000 readings/s (2,000 compressors at 1 Hz) with a live WebSocket client.
  pub = await publisher(env, devices);
  log(`paced: ${DEVICES} compressors connected; 2,000 readings/s for 15 s`);
  const token = createLiveToken({ userId: 1, sessionId: "bench-session", siteIds: null }, LIVE_SECRET);
  const ws = new WebSocket(`ws://127.0.0.1:${livePort}/live?token=${token}`, { origin: ORIGIN });
  let wsLat: number[] = [];
  let measuring = false;
  ws.on("message", (data) => {
    if (!measuring) return;
    const m = JSON.parse(String(data)) as LiveMessage;
    if (m.type === "update" && m.compressor.ts !== null) wsLat.push(Date.now() - m.compressor.ts);
  });
  await new Promise((r) => ws.once("open", r));
  await ing.call("reset");
  await broker.call("reset");
  await pub.call("reset");
  wsLat = [];
  measuring = true;
  await pub.call("paced", { devices: DEVICES, periodMs: 1_000, durationMs: 15_000 });
  await new Promise((r) => setTimeout(r, 500));
  measuring = false;
  ir = await ing.call("report");
  const ws2k = summarize(wsLat);
  log(`  commit p99 ${ir.commitLatency.p99} ms (${ir.commitLatency.n} readings); WebSocket p99 ${ws2k.p99} ms (${ws2k.n} updates); ingester peak RSS so far ${Math.round(ir.maxRssMb)} MB`);
  results.paced2000 = {
    commitLatencyMs: ir.commitLatency,
    wsLatencyMs: ws2k,
    ingesterEventLoopDelayMs: (ir as unknown as { eventLoopDelayMs: unknown }).eventLoopDelayMs,
    slowestCommitMs: Math.round((ir.stats as unknown as { slowestFlushMs: number }).slowestFlushMs),
    brokerEventLoopDelayMs: (await broker.call<{ eventLoopDelayMs: unknown }>("report")).eventLoopDelayMs,
    publisherEventLoopDelayMs: (await pub.call<{ eventLoopDelayMs: unknown }>("report")).eventLoopDelayMs,
  };

  // Phase 4: CPU for 200 compressors at 1 reading/s.
  log("cpu: 200 compressors at 1 reading/s for 20 s");
  await new Promise((r) => setTimeout(r, 1_000));
  await ing.call("reset");
  await broker.call("reset");
  await pub.call("paced", { devices: 200, periodMs: 1_000, durationMs: 20_000 });
  ir = await ing.call("report");
  const bcpu = await broker.call<{ cpuMs: number; wallMs: number }>("report");
  results.cpu200 = {
    ingesterCpuPercentOfOneCore: Number(((100 * ir.cpuMs) / ir.wallMs).toFixed(2)),
    brokerCpuPercentOfOneCore: Number(((100 * bcpu.cpuMs) / bcpu.wallMs).toFixed(2)),
    readings: ir.committed,
  };
  ws.close();
  const finalIng = await ing.call<IngReport>("report");
  results.ingesterPeakRssMb = Math.round(finalIng.maxRssMb);
  results.ingesterMemoryNowMb = {
    ...(finalIng as unknown as { memory: object }).memory,
    heapUsedAfterGc: (finalIng as unknown as { heapUsedAfterGcMb: number }).heapUsedAfterGcMb,
  };
  await pub.stop();
  await ing.stop();
  await broker.stop();

  // Storage: bytes per stored reading, raw table alone (dbstat) and the whole file after VACUUM.
  const check = openDatabase(dbFile);
  const rows = check.$client.prepare("SELECT count(*) AS n FROM readings").pluck().get() as number;
  check.$client.pragma("wal_checkpoint(TRUNCATE)");
  check.$client.exec("VACUUM");
  const pageSize = check.$client.pragma("page_size", { simple: true }) as number;
  const pages = check.$client.pragma("page_count", { simple: true }) as number;
  let readingsBytes: number | null = null;
  try {
    readingsBytes = check.$client.prepare("SELECT sum(pgsize) FROM dbstat WHERE name = 'readings'").pluck().get() as number;
  } catch {
    readingsBytes = null;
  }
  results.storage = {
    rows,
    bytesPerReadingRawTable: readingsBytes === null ? null : Number((readingsBytes / rows).toFixed(1)),
    bytesPerReadingWholeFile: Number(((pageSize * pages) / rows).toFixed(1)),
  };
  check.$client.close();
  fs.rmSync(dir, { recursive: true, force: true });

  const tp = results.throughput as { ingestReadingsPerS: number; ratio: number; commitLatencyMs: { p50: number; p99: number } };
  const pc = results.paced2000 as { commitLatencyMs: { p99: number }; wsLatencyMs: { p99: number } };
  const verdict = (ok: boolean) => (ok ? "ok " : "MISS");
  console.log(
    `\nAirkeep ingest benchmark (${os.cpus().length} cores, load average ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} at the end, Node ${process.version}, ${((Date.now() - t0) / 1000).toFixed(0)} s)`,
  );
  console.log(JSON.stringify(results, null, 2));
  console.log(`${verdict(tp.ingestReadingsPerS >= 20_000)} sustained ${tp.ingestReadingsPerS} readings/s (target ≥ 20,000)`);
  console.log(`${verdict(tp.ratio >= 0.6)} ${Math.round(tp.ratio * 100)} % of the bare QoS 1 rate (target ≥ 60 %)`);
  console.log(`${verdict(pc.commitLatencyMs.p99 <= 300)} p99 publish→commit at 2,000/s: ${pc.commitLatencyMs.p99} ms (target ≤ 300)`);
  console.log(`${verdict(pc.wsLatencyMs.p99 <= 50)} p99 publish→WebSocket at 2,000/s: ${pc.wsLatencyMs.p99} ms (target ≤ 50)`);
  console.log(`${verdict((results.ingesterPeakRssMb as number) < 250)} ingester peak RSS ${results.ingesterPeakRssMb} MB (target < 250)`);
  process.exit(0);
}

const role = process.argv[2] ?? "main";
const roles: Record<string, () => Promise<void>> = {
  main,
  broker: brokerRole,
  bare: bareRole,
  ingester: ingesterRole,
  publisher: publisherRole,
};
await roles[role]!();
