import { type ChildProcess, spawn } from "node:child_process";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import {
  connectDevice,
  count,
  type FleetDevice,
  freePort,
  makeTempDb,
  seedFleet,
  type TempDb,
  telemetry,
  topicOf,
  waitFor,
} from "./ingest-fixtures";

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";

let t: TempDb;
let d: FleetDevice;
let port: number;
const cleanups: (() => Promise<void> | void)[] = [];

beforeEach(async () => {
  t = makeTempDb("airkeep-restart-");
  d = seedFleet(t.db, { sites: ["north"], devices: [{ deviceId: "hp-1", siteCode: "north" }] }).devices.get("hp-1")!;
  port = await freePort();
});
afterEach(async () => {
  for (const c of cleanups.splice(0).reverse()) await c();
  t.cleanup();
});

async function broker(): Promise<BrokerHandle> {
  const b = await startBroker({ db: t.db, port, ingestPassword: INGEST_PASSWORD, log: () => {} });
  cleanups.push(() => b.close());
  return b;
}

async function ingester(): Promise<Ingester> {
  const i = await startIngester({
    db: t.db,
    mqttUrl: `mqtt://127.0.0.1:${port}`,
    password: INGEST_PASSWORD,
    flushMs: 30,
    live: null,
    log: () => {},
  });
  cleanups.push(() => i.close());
  return i;
}

const stored = () => count(t.db, "SELECT count(*) AS n FROM readings");
const seqs = () => (t.db.$client.prepare("SELECT seq FROM readings ORDER BY seq").pluck().all() as number[]);

describe("no QoS 1 reading is lost", () => {
  it("across a restart of the embedded broker while a device keeps publishing", async () => {
    let b = await broker();
    await ingester();
    await waitFor(() => b.stats().ingesterConnected, 5_000, "ingester");
    const will = { topic: topicOf(d, "status"), payload: Buffer.from('{"v":1,"status":"offline"}'), qos: 1 as const, retain: true };
    const dev = await connectDevice(`mqtt://127.0.0.1:${port}`, d, { reconnectPeriod: 100, clean: false, will });
    cleanups.push(() => void dev.end(true));
    const N = 300;
    const base = Date.now() - 60_000;
    for (let i = 0; i < N; i++) {
      dev.publish(topicOf(d), JSON.stringify(telemetry({ ts: base + i * 100, seq: i })), { qos: 1 });
      if (i === 120) {
        // The whole broker goes: a new instance with fresh memory comes up on the same port.
        await b.close();
        b = await broker();
      }
      await new Promise((r) => setTimeout(r, 3));
    }
    await waitFor(() => stored() === N, 15_000, `${N} rows (have ${stored()})`);
    expect(seqs()).toEqual(Array.from({ length: N }, (_, i) => i));
    // A planned broker restart is not the device's comms failure: its last will is not sent.
    expect(count(t.db, "SELECT count(*) AS n FROM device_events WHERE kind = 'comms_lost'")).toBe(0);
  });

  it("while the ingester is away: the broker holds its session from start-up", async () => {
    await broker();
    const dev = await connectDevice(`mqtt://127.0.0.1:${port}`, d);
    cleanups.push(() => void dev.end(true));
    const base = Date.now() - 60_000;
    for (let i = 0; i < 50; i++) {
      await dev.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: base + i * 1_000, seq: i })), { qos: 1 });
    }
    expect(stored()).toBe(0);
    await ingester();
    await waitFor(() => stored() === 50, 5_000, "queued readings");
  });

  it("when the ingester is killed before committing: it acknowledges only what is committed", async () => {
    const b = await broker();
    const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "lib/ingester/main.ts"], {
      cwd: process.cwd(),
      env: {
        ...process.env,
        DATABASE_URL: t.file,
        MQTT_URL: `mqtt://127.0.0.1:${port}`,
        MQTT_INGEST_PASSWORD: INGEST_PASSWORD,
        INGEST_FLUSH_MS: "600000",
        INGEST_BATCH_ROWS: "100000",
        LIVE_PORT: "off",
      },
      stdio: "ignore",
    });
    cleanups.push(() => void (child.exitCode === null && child.kill("SIGKILL")));
    await waitFor(() => b.stats().ingesterConnected, 40_000, "child ingester");
    const dev = await connectDevice(`mqtt://127.0.0.1:${port}`, d);
    cleanups.push(() => void dev.end(true));
    const base = Date.now() - 60_000;
    // Fewer than the 16 held acknowledgements that make the ingester commit on a lull.
    for (let i = 0; i < 12; i++) {
      await dev.publishAsync(topicOf(d), JSON.stringify(telemetry({ ts: base + i * 1_000, seq: i })), { qos: 1 });
    }
    // Delivered to the child but neither committed nor acknowledged.
    await new Promise((r) => setTimeout(r, 300));
    expect(b.stats().ingestQueue).toBe(12);
    expect(stored()).toBe(0);
    const exited = new Promise((r) => child.once("exit", r));
    process.kill(child.pid!, "SIGKILL");
    await exited;
    await waitFor(() => !b.stats().ingesterConnected, 5_000, "broker notices");

    await ingester();
    await waitFor(() => stored() === 12, 5_000, "redelivered readings");
    expect(seqs()).toEqual(Array.from({ length: 12 }, (_, i) => i));
    // Acknowledged right after the commit that made them visible.
    await waitFor(() => b.stats().ingestQueue === 0, 5_000, "acknowledgements");
  }, 60_000);
});
