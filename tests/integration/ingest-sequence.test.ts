import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import type { Telemetry } from "@/shared/telemetry";
import { connectDevice, type FleetDevice, makeTempDb, seedFleet, sendReadings, type TempDb, topicOf, waitFor } from "./ingest-fixtures";

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";

let t: TempDb;
let broker: BrokerHandle;
let ingester: Ingester;
let url: string;
let dev: Map<string, FleetDevice>;
const clients: MqttClient[] = [];

async function startIngest(): Promise<Ingester> {
  const i = await startIngester({ db: t.db, mqttUrl: url, password: INGEST_PASSWORD, flushMs: 20, brokerInflightCap: null, live: null, log: () => {} });
  await waitFor(() => i.stats().connected, 5_000, "ingester connected");
  return i;
}

beforeAll(async () => {
  t = makeTempDb("airkeep-sequence-");
  dev = seedFleet(t.db, {
    sites: ["north"],
    devices: ["sq-1", "sq-2", "sq-3", "sq-4", "sq-5", "sq-6"].map((deviceId) => ({ deviceId, siteCode: "north" })),
  }).devices;
  broker = await startBroker({ db: t.db, port: 0, ingestPassword: INGEST_PASSWORD, log: () => {} });
  url = `mqtt://127.0.0.1:${broker.port}`;
  ingester = await startIngest();
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  await ingester?.close();
  await broker?.close();
  t?.cleanup();
});

async function device(id: string): Promise<MqttClient> {
  const c = await connectDevice(url, dev.get(id)!);
  clients.push(c);
  return c;
}

const send = (c: MqttClient, id: string, readings: Partial<Telemetry>[]) => sendReadings(ingester, c, dev.get(id)!, readings);

const stored = (id: string) =>
  t.db.$client
    .prepare("SELECT seq, ts, delivery_bar AS bar FROM readings WHERE compressor_id = ? ORDER BY ts")
    .all(dev.get(id)!.compressorId) as { seq: number; ts: number; bar: number }[];

function counted() {
  const s = ingester.stats();
  return { ...s.rejects, seqRestarts: s.seqRestarts, lateReadings: s.lateReadings, stored: s.stored };
}
const since = (before: ReturnType<typeof counted>) => {
  const now = counted();
  return Object.fromEntries(Object.entries(now).filter(([k, v]) => v !== before[k as keyof typeof before]).map(([k, v]) => [k, v - before[k as keyof typeof before]]));
};

describe("sequence rule per device", () => {
  it("stores a seq once even when it comes again with another timestamp", async () => {
    const c = await device("sq-1");
    const t0 = Date.now() - 60_000;
    const before = counted();
    await send(c, "sq-1", [
      { seq: 10, ts: t0 },
      { seq: 10, ts: t0 + 1_000 },
      { seq: 10, ts: t0 - 1_000 },
      { seq: 11, ts: t0 + 2_000 },
    ]);
    expect(stored("sq-1").map((r) => [r.seq, r.ts])).toEqual([
      [10, t0],
      [11, t0 + 2_000],
    ]);
    expect(since(before)).toEqual({ seqRepeated: 2, stored: 2 });
  });

  it("refuses a falling seq or a falling clock that is no gateway restart, and counts each by reason", async () => {
    const c = await device("sq-2");
    const t0 = Date.now() - 60_000;
    const before = counted();
    await send(c, "sq-2", [
      { seq: 20, ts: t0 },
      { seq: 21, ts: t0 + 1_000 },
      { seq: 15, ts: t0 + 2_000 }, // lower seq, later time, no reconnect and not starting over
      { seq: 19, ts: t0 + 500 }, // a stale reading never stored
      { seq: 22, ts: t0 + 500 }, // higher seq stamped earlier
      { seq: 22, ts: t0 + 3_000 },
    ]);
    expect(stored("sq-2").map((r) => r.seq)).toEqual([20, 21, 22]);
    expect(since(before)).toEqual({ seqBackwards: 2, tsBackwards: 1, stored: 3 });
  });

  it("counts a distinct reading in an occupied millisecond instead of losing it silently, and keeps resends idempotent", async () => {
    const c = await device("sq-3");
    const t0 = Date.now() - 60_000;
    const before = counted();
    await send(c, "sq-3", [
      { seq: 30, ts: t0, deliveryBar: 200 },
      { seq: 31, ts: t0, deliveryBar: 201 }, // another reading in the same ms
      { seq: 30, ts: t0, deliveryBar: 200 }, // exact resend
      { seq: 32, ts: t0 + 1_000, deliveryBar: 202 },
      { seq: 30, ts: t0, deliveryBar: 200 }, // resend of an older stored reading
      { seq: 29, ts: t0 + 1_000, deliveryBar: 203 }, // an older seq in a held millisecond
    ]);
    expect(stored("sq-3")).toEqual([
      { seq: 30, ts: t0, bar: 200 },
      { seq: 32, ts: t0 + 1_000, bar: 202 },
    ]);
    expect(since(before)).toEqual({ sameTimestamp: 2, duplicate: 2, stored: 2 });
  });

  it("stores a reading that arrives after later ones (as a reconnecting client may resend) in its place", async () => {
    const c = await device("sq-6");
    const t0 = Date.now() - 60_000;
    const before = counted();
    await send(c, "sq-6", [
      { seq: 60, ts: t0 },
      { seq: 63, ts: t0 + 3_000 },
      { seq: 61, ts: t0 + 1_000 }, // late, fits between 60 and 63
      { seq: 62, ts: t0 + 500 }, // does not fit: after 61 by seq, before it by time
      { seq: 64, ts: t0 + 4_000 },
    ]);
    expect(stored("sq-6").map((r) => r.seq)).toEqual([60, 61, 63, 64]);
    expect(since(before)).toEqual({ lateReadings: 1, tsBackwards: 1, stored: 4 });
  });

  it("accepts a gateway restart: seq starting over after the device reconnects, or from 0/1, with a later timestamp", async () => {
    const id = "sq-4";
    const d = dev.get(id)!;
    const t0 = Date.now() - 60_000;
    let c = await device(id);
    const before = counted();
    await send(c, id, [
      { seq: 500, ts: t0 },
      { seq: 501, ts: t0 + 1_000 },
    ]);
    // The gateway restarts: a new connection announces itself (retained, as the contract asks), then counts from 7.
    c.end(true);
    c = await device(id);
    const statusBefore = ingester.stats().statusMessages;
    await c.publishAsync(topicOf(d, "status"), JSON.stringify({ v: 1, status: "online", ts: Date.now() }), { qos: 1, retain: true });
    await waitFor(() => ingester.stats().statusMessages > statusBefore, 3_000, "online status");
    await send(c, id, [
      { seq: 7, ts: t0 + 5_000 },
      { seq: 8, ts: t0 + 6_000 },
      { seq: 500, ts: t0 + 7_000 }, // repeats an old run's seq but is the next of this run
      // Restarted without reconnecting (only the application): recognised because it counts from 0 again.
      { seq: 0, ts: t0 + 9_000 },
      { seq: 1, ts: t0 + 10_000 },
      // The old run's seq again but stamped earlier than the new run: stale.
      { seq: 501, ts: t0 + 1_000 },
    ]);
    expect(stored(id).map((r) => r.seq)).toEqual([500, 501, 7, 8, 500, 0, 1]);
    expect(since(before)).toEqual({ seqRestarts: 2, duplicate: 1, stored: 7 });
  });

  it("keeps judging against the last stored reading after the ingester restarts", async () => {
    const id = "sq-5";
    const t0 = Date.now() - 60_000;
    const c = await device(id);
    await send(c, id, [
      { seq: 40, ts: t0 },
      { seq: 41, ts: t0 + 1_000 },
    ]);
    await ingester.close();
    ingester = await startIngest();
    const before = counted();
    await send(c, id, [
      { seq: 41, ts: t0 + 2_000 },
      { seq: 41, ts: t0 + 1_000 },
      { seq: 39, ts: t0 + 3_000 },
      { seq: 42, ts: t0 + 4_000 },
    ]);
    expect(stored(id).map((r) => r.seq)).toEqual([40, 41, 42]);
    expect(since(before)).toEqual({ seqRepeated: 1, duplicate: 1, seqBackwards: 1, stored: 1 });
  });
});
