// Broker fault figures: readings lost when the broker restarts while the ingester is away, valid readings stored
// after one refused ("poison") publish, and the broker's memory while unauthenticated clients send 100 MB packets.
// Run: npm run bench:broker   (READINGS=100000 AWAY_S=8 SENDERS=10; AWAY_S is the least time the ingester is away)
import { fork } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import bcrypt from "bcryptjs";
import mqtt, { type MqttClient } from "mqtt";
import mqttPacket from "mqtt-packet";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { startIngester } from "@/lib/ingester/ingester";
import { topicFor } from "@/shared/telemetry";
import { fixedHeader, flood } from "./mqtt-flood";

const SELF = fileURLToPath(import.meta.url);
const INGEST_PASSWORD = "bench-ingest-password-0123456789";
const MB = 1024 * 1024;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

type Device = { deviceId: string; siteCode: string; secret: string };

function tempDb(devices: number) {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "airkeep-bench-broker-"));
  const file = path.join(dir, "bench.db");
  const db = openDatabase(file);
  runMigrations(db);
  const now = Date.now();
  db.$client.prepare("INSERT INTO sites (name, code, time_zone, created_at) VALUES ('Bench', 'bench', 'UTC', ?)").run(now);
  db.$client
    .prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('B', 4, 300, 420, ?)")
    .run(now);
  const ins = db.$client.prepare(
    `INSERT INTO compressors (site_id, model_id, name, serial, device_id, device_secret_hash, stop_pressure_bar, restart_pressure_bar, created_at, updated_at)
     VALUES (1, 1, ?, ?, ?, ?, 300, 270, ?, ?)`,
  );
  const list: Device[] = [];
  for (let i = 0; i < devices; i++) {
    const d = { deviceId: `bench-${i}`, siteCode: "bench", secret: `secret-${i}` };
    ins.run(`Bench ${i}`, `BN-${i}`, d.deviceId, bcrypt.hashSync(d.secret, 4), now, now);
    list.push(d);
  }
  return { db, dir, file, devices: list };
}

function reading(seq: number, ts: number) {
  return JSON.stringify({
    v: 1, seq, ts, runState: "running", motorOn: true, deliveryBar: 250, stageBar: [6, 40, 150], stageC: [120, 130, 140],
    oilBar: 4.5, purifierC: 30, intakeC: 20, hourMeterH: 1234.5, starts: 456, tripCode: null,
  });
}

const connect = (port: number, d: Device) =>
  mqtt.connectAsync(`mqtt://127.0.0.1:${port}`, {
    clientId: d.deviceId, username: d.deviceId, password: d.secret, protocolVersion: 4, clean: false, reconnectPeriod: 200,
  });

async function until(fn: () => boolean, timeoutMs: number) {
  const deadline = Date.now() + timeoutMs;
  while (!fn() && Date.now() < deadline) await sleep(50);
  return fn();
}

// ---------- 1: broker restart while the ingester is away ----------

async function restartWhileAway(total: number, awayS: number) {
  const t = tempDb(10);
  const port = 21_000 + Math.floor(Math.random() * 10_000);
  const quiet = () => {};
  const brokerOpts = { db: t.db, port, ingestPassword: INGEST_PASSWORD, log: quiet };
  const ingesterOpts = { db: t.db, mqttUrl: `mqtt://127.0.0.1:${port}`, password: INGEST_PASSWORD, live: null, log: quiet };
  let broker: BrokerHandle = await startBroker(brokerOpts);
  let ingester = await startIngester(ingesterOpts);
  const clients: MqttClient[] = await Promise.all(t.devices.map((d) => connect(port, d)));
  const perDevice = Math.ceil(total / clients.length);
  const base = Date.now() - 86_400_000;
  const sent = { n: 0 };
  let next = 0;
  // Each device publishes readings [next, upTo) with up to 100 unacknowledged, as fast as the broker takes them.
  const publishUpTo = (upTo: number) => {
    const from = next;
    next = Math.min(perDevice, upTo);
    return Promise.all(
      clients.map(async (c, k) => {
        for (let i = from; i < next; i += 100) {
          const batch = [];
          for (let j = i; j < Math.min(next, i + 100); j++) {
            batch.push(c.publishAsync(topicFor("bench", t.devices[k]!.deviceId, "telemetry"), reading(j, base + j * 100), { qos: 1 }));
            sent.n++;
          }
          await Promise.all(batch);
        }
      }),
    );
  };
  // 10 % with the ingester there, 60 % while it is away before the broker restarts, 20 % after, 10 % once it is back.
  await publishUpTo(perDevice * 0.1);
  await ingester.close();
  const awayAt = Date.now();
  await publishUpTo(perDevice * 0.7);
  const queuedBefore = broker.stats().ingestQueue;
  await broker.close();
  broker = await startBroker(brokerOpts);
  const queuedAfter = broker.stats().ingestQueue;
  await publishUpTo(perDevice * 0.9);
  await sleep(Math.max(0, awayAt + awayS * 1000 - Date.now()));
  const awaySeconds = +((Date.now() - awayAt) / 1000).toFixed(1);
  ingester = await startIngester(ingesterOpts);
  await publishUpTo(perDevice);
  const stored = () => (t.db.$client.prepare("SELECT count(*) AS n FROM readings").get() as { n: number }).n;
  await until(() => stored() >= sent.n, 60_000);
  const result = {
    sent: sent.n,
    stored: stored(),
    lost: sent.n - stored(),
    ingesterAwaySeconds: awaySeconds,
    queuedAtRestart: queuedBefore,
    reloadedAfterRestart: queuedAfter,
    ingesterRejects: Object.fromEntries(Object.entries(ingester.stats().rejects).filter(([, n]) => n > 0)),
  };
  await Promise.all(clients.map((c) => c.endAsync(true)));
  await ingester.close();
  await broker.close();
  t.db.$client.close();
  fs.rmSync(t.dir, { recursive: true, force: true });
  return result;
}

// ---------- 2: one poison message ----------

async function poison() {
  const t = tempDb(1);
  const port = 31_000 + Math.floor(Math.random() * 10_000);
  const quiet = () => {};
  const broker = await startBroker({ db: t.db, port, ingestPassword: INGEST_PASSWORD, log: quiet });
  const ingester = await startIngester({ db: t.db, mqttUrl: `mqtt://127.0.0.1:${port}`, password: INGEST_PASSWORD, live: null, log: quiet });
  const d = t.devices[0]!;
  const c = await connect(port, d);
  let reconnects = 0;
  c.on("reconnect", () => reconnects++);
  const topic = topicFor("bench", d.deviceId, "telemetry");
  const base = Date.now() - 3_600_000;
  void c.publishAsync(topic, Buffer.alloc(100_000, 0x7b), { qos: 1 }).catch(() => {});
  for (let i = 1; i < 200; i++) await c.publishAsync(topic, reading(i, base + i * 1_000), { qos: 1 });
  const stored = () => (t.db.$client.prepare("SELECT count(*) AS n FROM readings").get() as { n: number }).n;
  await until(() => stored() >= 199, 10_000);
  const result = { valid: 199, stored: stored(), reconnects, refused: broker.stats().refused };
  await c.endAsync(true);
  await ingester.close();
  await broker.close();
  t.db.$client.close();
  fs.rmSync(t.dir, { recursive: true, force: true });
  return result;
}

// ---------- 3: unauthenticated 100 MB senders (broker in its own process) ----------

async function brokerChild() {
  const db = openDatabase(process.env.BENCH_DB!);
  const broker = await startBroker({ db, port: Number(process.env.BENCH_PORT), ingestPassword: INGEST_PASSWORD, log: () => {} });
  let peak = 0;
  setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 10).unref();
  process.on("message", (m: { cmd: string }) => {
    const rss = process.memoryUsage().rss;
    if (m.cmd === "reset") peak = rss;
    process.send?.({ rss, peak: Math.max(peak, rss), refused: broker.stats().refused });
  });
  process.send?.({ ready: true });
}

async function memory(senders: number) {
  const t = tempDb(1);
  t.db.$client.close();
  const port = 41_000 + Math.floor(Math.random() * 10_000);
  const child = fork(SELF, ["broker-child"], {
    execArgv: ["--import", "tsx"],
    env: { ...process.env, BENCH_DB: t.file, BENCH_PORT: String(port) },
  });
  type Reply = { rss: number; peak: number; refused: Record<string, number>; ready?: boolean };
  const next = () => new Promise<Reply>((r) => child.once("message", (m: Reply) => r(m)));
  await next();
  await sleep(1_000);
  const ask = async (cmd: string) => {
    const p = next();
    child.send({ cmd });
    return p;
  };
  const idle = await ask("reset");
  // 100 MB announced by a PUBLISH header with no CONNECT, by a CONNECT header, or by a PUBLISH right behind a CONNECT
  // with a wrong password (sent before the broker has answered it).
  const length = 100 * 1000 * 1000;
  const t0 = Date.now();
  const badConnect = mqttPacket.generate({
    cmd: "connect", protocolId: "MQTT", protocolVersion: 4, clientId: "bench-0", username: "bench-0", password: Buffer.from("wrong"),
    clean: true, keepalive: 30,
  });
  const heads = [fixedHeader(3, length), fixedHeader(1, length), Buffer.concat([badConnect, fixedHeader(3, length)])];
  const sentBytes = await Promise.all(Array.from({ length: senders }, (_, i) => flood(port, heads[i % 3]!, length, MB).done));
  const ms = Date.now() - t0;
  await sleep(200);
  const after = await ask("stats");
  child.kill("SIGKILL");
  fs.rmSync(t.dir, { recursive: true, force: true });
  return {
    senders,
    idleMB: +(idle.rss / MB).toFixed(1),
    peakMB: +(after.peak / MB).toFixed(1),
    aboveIdleMB: +((after.peak - idle.rss) / MB).toFixed(1),
    bytesWrittenBeforeDropMB: +(sentBytes.reduce((a, b) => a + b, 0) / MB).toFixed(1),
    msUntilAllDropped: ms,
    refused: after.refused,
  };
}

async function main() {
  console.log(`load average at the start: ${os.loadavg().map((x) => x.toFixed(1)).join(" ")} on ${os.cpus().length} cores`);
  const readings = Number(process.env.READINGS ?? 100_000);
  const awayS = Number(process.env.AWAY_S ?? 8);
  const senders = Number(process.env.SENDERS ?? 10);
  const restart = await restartWhileAway(readings, awayS);
  console.log(`broker restart with the ingester away ${awayS} s:`, restart);
  const p = await poison();
  console.log("one poison message, then 199 valid readings:", p);
  const m = await memory(senders);
  console.log(`${senders} unauthenticated senders of 100 MB packets:`, m);
  process.exit(0);
}

if (process.argv[2] === "broker-child") await brokerChild();
else await main();
