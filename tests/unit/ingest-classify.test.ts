import { describe, expect, it } from "vitest";
import { classifyMessage } from "@/lib/ingester/classify";
import type { DirectoryEntry } from "@/lib/ingester/device-directory";
import { MAX_PAYLOAD_BYTES } from "@/shared/telemetry";

const NOW = Date.UTC(2025, 5, 1, 12, 0, 0);
const dir = new Map<string, DirectoryEntry>([
  ["hp-1", { compressorId: 7, deviceId: "hp-1", siteId: 1, siteCode: "north", ratedPressureBar: 330 }],
]);
const lookup = (id: string) => dir.get(id);
const topic = "airkeep/v1/north/hp-1/telemetry";
const good = {
  v: 1,
  seq: 10,
  ts: NOW - 1_000,
  runState: "running",
  motorOn: true,
  deliveryBar: 212.5,
  stageBar: [5.8, 38, 160],
  stageC: [110, 125, null],
  oilBar: 4.2,
  purifierC: 28,
  intakeC: 18,
  hourMeterH: 1520.25,
  starts: 310,
  tripCode: null,
};
const buf = (x: unknown) => Buffer.from(typeof x === "string" ? x : JSON.stringify(x));
const classify = (t: string, payload: unknown, limits?: { maxFutureMs: number; maxAgeMs: number }) =>
  classifyMessage(t, buf(payload), NOW, lookup, limits);

describe("classifyMessage", () => {
  it("accepts a well-formed reading from a known device at its own site", () => {
    const r = classify(topic, good);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.device.compressorId).toBe(7);
  });

  it("refuses a payload over MAX_PAYLOAD_BYTES before parsing it", () => {
    const big = { ...good, pad: "x".repeat(MAX_PAYLOAD_BYTES) };
    expect(classify(topic, big)).toMatchObject({ ok: false, reason: "oversized" });
    const exactly = "x".repeat(MAX_PAYLOAD_BYTES);
    expect(classify(topic, exactly)).toMatchObject({ ok: false, reason: "badJson" });
  });

  it("refuses bad JSON", () => {
    expect(classify(topic, "{not json")).toMatchObject({ ok: false, reason: "badJson" });
    expect(classify(topic, '{"deliveryBar": NaN}')).toMatchObject({ ok: false, reason: "badJson" });
  });

  it.each([
    ["a wrong type", { ...good, deliveryBar: "212" }],
    ["a pressure below vacuum", { ...good, deliveryBar: -1.5 }],
    ["a non-finite number (1e999 parses to Infinity)", `${JSON.stringify(good).slice(0, -1)},"oilBar":1e999}`],
    ["an unknown run state", { ...good, runState: "idling" }],
    ["an unexpected key", { ...good, extra: 1 }],
    ["a wrong version", { ...good, v: 2 }],
    ["too many stages", { ...good, stageC: [1, 2, 3, 4, 5] }],
    ["a fractional seq", { ...good, seq: 1.5 }],
  ])("refuses %s as a schema violation", (_label, payload) => {
    expect(classify(topic, payload)).toMatchObject({ ok: false, reason: "schema" });
  });

  it.each([
    "airkeep/v1/north/hp-1",
    "airkeep/v1/north/hp-1/telemetry/extra",
    "airkeep/v2/north/hp-1/telemetry",
    "airkeep/v1/North/hp-1/telemetry",
    "airkeep/v1/north/hp-1/config",
  ])("refuses the topic %s as unknown", (t) => {
    expect(classify(t, good)).toMatchObject({ ok: false, reason: "unknownTopic" });
  });

  it("refuses a device that is not a compressor, or that publishes under another site's code", () => {
    expect(classify("airkeep/v1/north/hp-9/telemetry", good)).toMatchObject({ ok: false, reason: "unknownDevice" });
    expect(classify("airkeep/v1/south/hp-1/telemetry", good)).toMatchObject({ ok: false, reason: "unknownDevice" });
  });

  it("refuses device time too far ahead or too old, with configurable limits", () => {
    expect(classify(topic, { ...good, ts: NOW + 5 * 60_000 + 1 })).toMatchObject({ ok: false, reason: "future" });
    expect(classify(topic, { ...good, ts: NOW + 5 * 60_000 }).ok).toBe(true);
    expect(classify(topic, { ...good, ts: NOW - 7 * 86_400_000 - 1 })).toMatchObject({ ok: false, reason: "tooOld" });
    expect(classify(topic, { ...good, ts: NOW - 7 * 86_400_000 }).ok).toBe(true);
    const tight = { maxFutureMs: 1_000, maxAgeMs: 60_000 };
    expect(classify(topic, { ...good, ts: NOW + 2_000 }, tight)).toMatchObject({ ok: false, reason: "future" });
    expect(classify(topic, { ...good, ts: NOW - 61_000 }, tight)).toMatchObject({ ok: false, reason: "tooOld" });
  });

  it("applies the same checks to the event channel", () => {
    const ev = { v: 1, seq: 3, ts: NOW, kind: "trip", runState: "tripped", tripCode: 12, text: "final stage temperature" };
    expect(classify("airkeep/v1/north/hp-1/event", ev).ok).toBe(true);
    expect(classify("airkeep/v1/north/hp-1/event", { ...ev, kind: "alarm" })).toMatchObject({ reason: "schema" });
    expect(classify("airkeep/v1/north/hp-1/event", { ...ev, ts: NOW - 8 * 86_400_000 })).toMatchObject({
      reason: "tooOld",
    });
  });

  it("accepts a status message with an old timestamp (a last will is written at connect time)", () => {
    const r = classify("airkeep/v1/north/hp-1/status", { v: 1, status: "offline", ts: NOW - 30 * 86_400_000 });
    expect(r).toMatchObject({ ok: true, channel: "status" });
    expect(classify("airkeep/v1/north/hp-1/status", { v: 1, status: "asleep" })).toMatchObject({ reason: "schema" });
  });
});
