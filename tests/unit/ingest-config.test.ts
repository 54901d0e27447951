import { describe, expect, it } from "vitest";
import type { Db } from "@/db/client";
import { ingesterOptionsFromEnv } from "@/lib/ingester/config";

const db = { $client: {} } as unknown as Db;
const base = { MQTT_INGEST_PASSWORD: "ingest-password-for-tests-0123456789", LIVE_PORT: "off" };

describe("ingester settings from the environment", () => {
  it("assumes a standard broker's in-flight cap unless told the broker has none", () => {
    expect(ingesterOptionsFromEnv(db, base).brokerInflightCap).toBe(20);
    expect(ingesterOptionsFromEnv(db, { ...base, MQTT_MAX_INFLIGHT: "100" }).brokerInflightCap).toBe(100);
    expect(ingesterOptionsFromEnv(db, { ...base, MQTT_MAX_INFLIGHT: "none" }).brokerInflightCap).toBeNull();
    expect(() => ingesterOptionsFromEnv(db, { ...base, MQTT_MAX_INFLIGHT: "lots" })).toThrow(/MQTT_MAX_INFLIGHT must be a number/);
  });

  it("commits in batches of up to 10,000 readings or after 100 ms by default", () => {
    const o = ingesterOptionsFromEnv(db, base);
    expect([o.batchRows, o.flushMs]).toEqual([10_000, 100]);
    expect(ingesterOptionsFromEnv(db, { ...base, INGEST_BATCH_ROWS: "500" }).batchRows).toBe(500);
  });
});
