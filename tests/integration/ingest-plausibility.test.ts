import type { MqttClient } from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getCompressorState, getIngesterStatus } from "@/db/telemetry-state";
import { type BrokerHandle, startBroker } from "@/lib/broker/broker";
import { type Ingester, startIngester } from "@/lib/ingester/ingester";
import type { Telemetry } from "@/shared/telemetry";
import { connectDevice, type FleetDevice, makeTempDb, seedFleet, sendReadings, type TempDb, waitFor } from "./ingest-fixtures";

const INGEST_PASSWORD = "ingest-password-for-tests-0123456789";

let t: TempDb;
let broker: BrokerHandle;
let ingester: Ingester;
let url: string;
let dev: Map<string, FleetDevice>;
const clients: MqttClient[] = [];

beforeAll(async () => {
  t = makeTempDb("airkeep-plausible-");
  // seedFleet gives every compressor a 420-bar model; "small" is moved to a 225-bar portable model.
  dev = seedFleet(t.db, { sites: ["north"], devices: ["small", "large"].map((deviceId) => ({ deviceId, siteCode: "north" })) }).devices;
  const model = t.db.$client
    .prepare("INSERT INTO compressor_models (name, stages, rated_delivery_lpm, rated_pressure_bar, created_at) VALUES ('Portable 225', 3, 100, 225, ?)")
    .run(Date.now()).lastInsertRowid;
  t.db.$client.prepare("UPDATE compressors SET model_id = ? WHERE id = ?").run(model, dev.get("small")!.compressorId);
  broker = await startBroker({ db: t.db, port: 0, ingestPassword: INGEST_PASSWORD, log: () => {} });
  url = `mqtt://127.0.0.1:${broker.port}`;
  ingester = await startIngester({
    db: t.db,
    mqttUrl: url,
    password: INGEST_PASSWORD,
    flushMs: 20,
    brokerInflightCap: null,
    statusIntervalMs: 100,
    live: null,
    log: () => {},
  });
  await waitFor(() => ingester.stats().connected, 5_000, "ingester connected");
});

afterAll(async () => {
  for (const c of clients) c.end(true);
  await ingester?.close();
  await broker?.close();
  t?.cleanup();
});

async function send(id: string, readings: Partial<Telemetry>[]): Promise<void> {
  const c = await connectDevice(url, dev.get(id)!);
  clients.push(c);
  await sendReadings(ingester, c, dev.get(id)!, readings);
}

type Row = { seq: number; delivery_bar: number | null; stage3_bar: number | null; stage1_c: number | null; implausible: string | null };
const rows = (id: string) =>
  t.db.$client
    .prepare("SELECT seq, delivery_bar, stage3_bar, stage1_c, implausible FROM readings WHERE compressor_id = ? ORDER BY ts")
    .all(dev.get(id)!.compressorId) as Row[];

describe("pressure plausibility per model", () => {
  it("keeps a reading whose pressure its model cannot reach, withholds that pressure as a sensor fault and counts it", async () => {
    const t0 = Date.now() - 30_000;
    // 225-bar model: the ceiling is 1.2 × 225 = 270 bar.
    await send("small", [
      { seq: 1, ts: t0, deliveryBar: 675, stageBar: [6, 40, 150] },
      { seq: 2, ts: t0 + 1_000, deliveryBar: 270, stageBar: [6, 40, 300] },
      { seq: 3, ts: t0 + 2_000, deliveryBar: 210, stageBar: [6, 40, 150] },
    ]);
    expect(rows("small")).toEqual([
      { seq: 1, delivery_bar: null, stage3_bar: 150, stage1_c: 120, implausible: '{"deliveryBar":675}' },
      { seq: 2, delivery_bar: 270, stage3_bar: null, stage1_c: 120, implausible: '{"stage3Bar":300}' },
      { seq: 3, delivery_bar: 210, stage3_bar: 150, stage1_c: 120, implausible: null },
    ]);
    expect(ingester.stats().sensorFaults).toMatchObject({ deliveryBar: 1, stage3Bar: 1, stage1Bar: 0 });
    expect(ingester.stats().rejects.schema).toBe(0);
    // The minute's rollup never saw 675 bar.
    const max = t.db.$client
      .prepare("SELECT max(delivery_bar_max) FROM readings_1m WHERE compressor_id = ?")
      .pluck()
      .get(dev.get("small")!.compressorId);
    expect(max).toBe(270);
    await waitFor(() => getIngesterStatus(t.db)?.counters["sensorFault.deliveryBar"] === 1, 3_000, "health counter");
  });

  it("judges each compressor by its own model: 400 bar is normal for a 420-bar unit, and even 800 bar is kept as a fault", async () => {
    const t0 = Date.now() - 30_000;
    await send("large", [
      { seq: 1, ts: t0, deliveryBar: 400 },
      { seq: 2, ts: t0 + 1_000, deliveryBar: 800 },
    ]);
    expect(rows("large").map((r) => [r.delivery_bar, r.implausible])).toEqual([
      [400, null],
      [null, '{"deliveryBar":800}'],
    ]);
    // The board shows no pressure for the faulty reading rather than a false one.
    expect(getCompressorState(t.db, dev.get("large")!.compressorId)).toMatchObject({ ts: t0 + 1_000, deliveryBar: null });
  });
});
